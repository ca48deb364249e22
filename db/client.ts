import fs from "node:fs";
import path from "node:path";
import Database from "better-sqlite3";
import { drizzle, type BetterSQLite3Database } from "drizzle-orm/better-sqlite3";
import { migrate } from "drizzle-orm/better-sqlite3/migrator";
import { z } from "zod";
import * as schema from "./schema";

export type Db = BetterSQLite3Database<typeof schema> & { $client: Database.Database };

/**
 * Opens a database with the pragmas every connection needs.
 * Two connections write: the event loop's and the ingest store worker's (gateway/store-worker.ts).
 * Write transactions therefore begin IMMEDIATE (`{ behavior: "immediate" }`): a deferred one that
 * read first cannot upgrade to a write once the other connection has committed
 * (SQLITE_BUSY_SNAPSHOT, no busy wait), while an immediate one waits its turn (busy_timeout).
 * WAL lets page requests read while ingestion writes; synchronous=NORMAL in WAL mode
 * survives a process kill without losing committed transactions (a power loss can drop
 * the last few commits, see gateway/PROTOCOL.md).
 */
export function openDb(file: string): Db {
  const onDisk = file !== ":memory:";
  if (onDisk) createOwnerOnly(file);
  const sqlite = new Database(file);
  // 16 KB pages for a new database (ignored for an existing one: WAL fixes the page size once the
  // file has a header). Ingestion adds a reading to every point's b-tree leaf at every flush, and
  // a commit's cost goes with the pages it dirties; 16 KB holds four times the points of the
  // default 4 KB (npm run bench:store).
  sqlite.pragma("page_size = 16384");
  sqlite.pragma("journal_mode = WAL");
  sqlite.pragma("synchronous = NORMAL");
  sqlite.pragma("foreign_keys = ON");
  sqlite.pragma("busy_timeout = 5000");
  // Ingestion touches a page of every point it writes; 64 MB holds the hot b-tree pages of a
  // large portfolio, where the default 2 MB would miss on most of them.
  sqlite.pragma("cache_size = -65536");
  // The ingest writer checkpoints from a worker thread (gateway/checkpointer.ts); the automatic
  // checkpoint, which would run inside a commit on the event loop, is only a safety net at
  // 10,000 pages. A WAL left larger than 64 MB is truncated back after a checkpoint.
  sqlite.pragma("wal_autocheckpoint = 10000");
  sqlite.pragma("journal_size_limit = 67108864");
  if (onDisk) {
    for (const f of [file, `${file}-wal`, `${file}-shm`]) keepOwnerOnly(f);
    const fullDiskControl = testFullDiskControl();
    if (fullDiskControl) simulateFullDisk(sqlite, fullDiskControl);
  }
  return drizzle(sqlite, { schema }) as Db;
}

/**
 * The database holds password hashes and every site's data: its folder is created 0700 and the
 * file 0600 before SQLite opens it, which then gives its WAL and SHM files the same mode.
 */
function createOwnerOnly(file: string) {
  fs.mkdirSync(path.dirname(path.resolve(file)), { recursive: true, mode: 0o700 });
  try {
    fs.writeFileSync(file, "", { flag: "wx", mode: 0o600 });
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code !== "EEXIST") throw err;
  }
}

/** Takes group and other access away from a file made before the modes above were set. */
function keepOwnerOnly(file: string) {
  try {
    const { mode } = fs.statSync(file);
    if (mode & 0o077) fs.chmodSync(file, mode & 0o700);
  } catch {
    // not there (no WAL yet), or not ours to change
  }
}

/**
 * Tests only: LIFTLINE_TEST_FULL_DISK_FILE names a file whose content "full" makes this
 * connection unable to add a page, so SQLite fails with SQLITE_FULL ("database or disk is full")
 * as on a full disk; any other content lifts that. Both connections (the event loop's and the
 * store worker's) watch it, so a test fills and frees the "disk" of a running server.
 */
function testFullDiskControl(): string | undefined {
  return z.string().min(1).optional().parse(process.env.LIFTLINE_TEST_FULL_DISK_FILE);
}

function simulateFullDisk(sqlite: Database.Database, control: string) {
  const unlimited = sqlite.pragma("max_page_count", { simple: true }) as number;
  let applied: boolean | undefined;
  const apply = () => {
    if (!sqlite.open) return clearInterval(timer);
    let full = false;
    try {
      full = fs.readFileSync(control, "utf8").trim() === "full";
    } catch {
      // no file: not full
    }
    if (full === applied) return;
    applied = full;
    // SQLite raises a limit below the current size to the current size: no page can be added.
    sqlite.pragma(`max_page_count = ${full ? 1 : unlimited}`);
  };
  const timer = setInterval(apply, 50);
  timer.unref();
  apply();
}

export const migrationsFolder = path.join(process.cwd(), "db", "migrations");

export function migrateDb(db: Db): void {
  migrate(db, { migrationsFolder });
}
