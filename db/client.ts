import fs from "node:fs";
import path from "node:path";
import Database from "better-sqlite3";
import { drizzle, type BetterSQLite3Database } from "drizzle-orm/better-sqlite3";
import { migrate } from "drizzle-orm/better-sqlite3/migrator";
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
  if (file !== ":memory:") fs.mkdirSync(path.dirname(path.resolve(file)), { recursive: true });
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
  return drizzle(sqlite, { schema }) as Db;
}

export const migrationsFolder = path.join(process.cwd(), "db", "migrations");

export function migrateDb(db: Db): void {
  migrate(db, { migrationsFolder });
}
