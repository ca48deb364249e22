import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import type Database from "better-sqlite3";
import { migrateDb, openDb } from "@/db/client";
import { startCheckpointer } from "@/gateway/checkpointer";

// The benches' bare database: the migrated schema with one customer, site and chiller, and
// `count` points (ids 1..count) for raw readings to go to. No point map, no gateway.
export function seedRawPoints(sqlite: Database.Database, count: number): void {
  sqlite.exec(
    "insert into organizations (id, name, kind) values ('o','o','customer'); insert into sites (id,name,organization_id,kind,address,time_zone) values ('s','s','o','k','a','UTC'); insert into equipment (id, site_id, tag, name, kind) values ('e','s','T','n','chiller')",
  );
  const insertPoint = sqlite.prepare(
    "insert into points (equipment_id, key, quantity, unit, brick_class) values ('e', ?, 'compressor_power', 'kW', 'x')",
  );
  sqlite.transaction(() => {
    for (let i = 0; i < count; i++) insertPoint.run(`k${i}`);
  })();
}

/** A raw table to copy for each yardstick trial: its points, and `rows` readings already in it. */
export interface RawTemplate {
  file: string;
  pointCount: number;
  rows: number;
  remove(): void;
}

/**
 * Reading i of the yardstick's insert order: the points in turn, each point's timestamp one
 * second on per round, so every reading lands at the end of its point's range in the b-tree.
 */
function insertReadings(sqlite: Database.Database, pointCount: number) {
  const ins = sqlite.prepare(
    "insert or ignore into readings (point_id, ts, value, text, quality) values (?, ?, ?, null, 0)",
  );
  return sqlite.transaction((from: number, to: number) => {
    for (let i = from; i < to; i++)
      ins.run((i % pointCount) + 1, 1_700_000_000_000 + Math.floor(i / pointCount) * 1000, i * 0.5);
  });
}

/** The yardstick's table, empty but for its points. */
export function rawTemplate(pointCount: number): RawTemplate {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "liftline-raw-template-"));
  const file = path.join(dir, "raw.db");
  const db = openDb(file);
  migrateDb(db);
  seedRawPoints(db.$client, pointCount);
  db.$client.close();
  return { file, pointCount, rows: 0, remove: () => fs.rmSync(dir, { recursive: true, force: true }) };
}

/** Adds readings in the yardstick's own order (untimed, 50,000 a transaction) until the template holds `rows`. */
export function growTemplate(template: RawTemplate, rows: number): void {
  if (rows <= template.rows) return;
  const sqlite = openDb(template.file).$client;
  const insert = insertReadings(sqlite, template.pointCount);
  for (let i = template.rows; i < rows; i += 50_000) insert(i, Math.min(rows, i + 50_000));
  // Everything into the main file, so a copy of that one file is the whole database.
  sqlite.pragma("wal_checkpoint(TRUNCATE)");
  sqlite.close();
  template.rows = rows;
}

/**
 * Rows/s of `rows` raw better-sqlite3 inserts in `batch`-row transactions into a copy of the
 * template, under the server's storage conditions: its connection pragmas (db/client.ts: WAL,
 * synchronous=NORMAL) and its background checkpoint beside the inserts (gateway/checkpointer.ts), so
 * the loop does not checkpoint inside its own commits where the server does not.
 */
export async function rawInsertRate(template: RawTemplate, batch: number, rows: number): Promise<number> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "liftline-raw-"));
  const file = path.join(dir, "raw.db");
  fs.copyFileSync(template.file, file);
  const sqlite = openDb(file).$client;
  const checkpointer = startCheckpointer(file, 100, (line) => console.log(line));
  const insert = insertReadings(sqlite, template.pointCount);
  const start = template.rows;
  const t0 = performance.now();
  for (let i = start; i < start + rows; i += batch) insert(i, i + batch);
  const s = (performance.now() - t0) / 1000;
  await checkpointer.stop();
  sqlite.close();
  fs.rmSync(dir, { recursive: true, force: true });
  return rows / s;
}
