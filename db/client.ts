import fs from "node:fs";
import path from "node:path";
import Database from "better-sqlite3";
import { drizzle, type BetterSQLite3Database } from "drizzle-orm/better-sqlite3";
import { migrate } from "drizzle-orm/better-sqlite3/migrator";
import * as schema from "./schema";

export type Db = BetterSQLite3Database<typeof schema> & { $client: Database.Database };

/**
 * Opens a database with the pragmas every connection needs.
 * WAL lets page requests read while ingestion writes; synchronous=NORMAL in WAL mode
 * survives a process kill without losing committed transactions (a power loss can drop
 * the last few commits, see gateway/PROTOCOL.md).
 */
export function openDb(file: string): Db {
  if (file !== ":memory:") fs.mkdirSync(path.dirname(path.resolve(file)), { recursive: true });
  const sqlite = new Database(file);
  sqlite.pragma("journal_mode = WAL");
  sqlite.pragma("synchronous = NORMAL");
  sqlite.pragma("foreign_keys = ON");
  sqlite.pragma("busy_timeout = 5000");
  return drizzle(sqlite, { schema }) as Db;
}

export const migrationsFolder = path.join(process.cwd(), "db", "migrations");

export function migrateDb(db: Db): void {
  migrate(db, { migrationsFolder });
}

// Next bundles route handlers separately from server.ts, so module state is not shared;
// the process-wide connection lives on globalThis and both sides find the same one.
const globalForDb = globalThis as unknown as { __liftlineDb?: Db };

export function getDb(): Db {
  if (!globalForDb.__liftlineDb) {
    globalForDb.__liftlineDb = openDb(process.env.DATABASE_PATH ?? "data/liftline.db");
  }
  return globalForDb.__liftlineDb;
}

/** Used by server.ts and tests to make their connection the process-wide one. */
export function setDb(db: Db | undefined): void {
  globalForDb.__liftlineDb = db;
}
