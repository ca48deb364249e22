// Store benchmark (`npm run bench:store`): what one flush costs the ingest store
// (gateway/store.ts) on a table that has grown, by database page size. No MQTT, no event loop:
// flushes go straight into createStore on a file database, with the background checkpoint
// running beside it as in the server.
//
// Shape of the load: 400 gateways × 250 points = 100,000 points; messages of 20 consecutive
// points of one gateway (BENCH_STORE_PER_MESSAGE) arrive in random gateway order (as from gateways publishing at once),
// 40,000 rows a flush (what one flush holds when the server is saturated). The table is
// first filled with BENCH_STORE_PREFILL readings in the same order, so each flush adds a row to
// leaves spread over the whole b-tree — the case the 1,000-row raw yardstick of
// `bench:ingest` (sequential points, a fresh table) does not see.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import Database from "better-sqlite3";
import { z } from "zod";
import { migrateDb, openDb } from "@/db/client";
import { createStore, type FlushWire } from "@/gateway/store";
import { startCheckpointer } from "@/gateway/checkpointer";
import { seedRawPoints } from "./raw-table";

const env = z
  .object({
    BENCH_STORE_PREFILL: z.coerce.number().int().min(0).default(4_000_000),
    BENCH_STORE_ROWS: z.coerce.number().int().min(40_000).default(2_000_000),
    BENCH_STORE_FLUSH_ROWS: z.coerce.number().int().min(20).default(40_000),
    /** Page sizes to compare, comma-separated; 0 means the project's own (db/client.ts). */
    BENCH_STORE_PAGE_SIZES: z.string().default("4096,0"),
    /** Consecutive points of one gateway per message: 20, or 250 for a plant's whole scan. */
    BENCH_STORE_PER_MESSAGE: z.coerce.number().int().min(1).max(250).default(20),
  })
  .parse(process.env);

const GATEWAYS = 400;
const POINTS_PER_GATEWAY = 250;
const PER_MESSAGE = env.BENCH_STORE_PER_MESSAGE;

/** Rows in arrival order: a random gateway's next 20 points per message, each point's ts one step on per round. */
function arrivals(startMs: number) {
  const cursor = new Int32Array(GATEWAYS);
  let seed = 1;
  const random = () => (seed = (seed * 1103515245 + 12345) & 0x7fffffff) / 0x7fffffff;
  return (rows: number) => {
    const pointId = new Int32Array(rows);
    const ts = new Float64Array(rows);
    for (let i = 0; i < rows;) {
      const g = Math.floor(random() * GATEWAYS);
      for (let k = 0; k < PER_MESSAGE && i < rows; k++, i++) {
        const c = cursor[g]++;
        pointId[i] = g * POINTS_PER_GATEWAY + (c % POINTS_PER_GATEWAY) + 1;
        ts[i] = startMs + Math.floor(c / POINTS_PER_GATEWAY);
      }
    }
    return { pointId, ts };
  };
}

async function run(pageSize: number) {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "liftline-store-"));
  const file = path.join(dir, "store.db");
  if (pageSize) {
    // Before openDb: the first connection to write a header fixes the page size.
    const first = new Database(file);
    first.pragma(`page_size = ${pageSize}`);
    first.pragma("journal_mode = WAL");
    first.close();
  }
  const db = openDb(file);
  migrateDb(db);
  const sqlite = db.$client;
  seedRawPoints(sqlite, GATEWAYS * POINTS_PER_GATEWAY);
  // Readings near now, so they join open rollup minutes as live ones do.
  const next = arrivals(Date.now());
  const prefill = sqlite.prepare("insert into readings (point_id, ts, value, text, quality) values (?, ?, ?, null, 0)");
  let t0 = performance.now();
  for (let done = 0; done < env.BENCH_STORE_PREFILL; done += 50_000) {
    const { pointId, ts } = next(Math.min(50_000, env.BENCH_STORE_PREFILL - done));
    sqlite.transaction(() => {
      for (let i = 0; i < pointId.length; i++) prefill.run(pointId[i], ts[i], i * 0.01);
    })();
  }
  sqlite.pragma("wal_checkpoint(TRUNCATE)");
  const prefillS = (performance.now() - t0) / 1000;

  // The server's background checkpoint, as the writer runs it: PASSIVE every 100 ms on its own connection.
  const checkpointer = startCheckpointer(file, 100, console.log);
  const store = createStore(sqlite, { graceMs: 10_000, latestEveryMs: 2000, nowMs: Date.now(), log: console.log });
  const flushRows = env.BENCH_STORE_FLUSH_ROWS;
  const flushMs: number[] = [];
  t0 = performance.now();
  for (let done = 0, id = 1; done < env.BENCH_STORE_ROWS; done += flushRows, id++) {
    const { pointId, ts } = next(flushRows);
    const batches = Array.from({ length: Math.ceil(flushRows / PER_MESSAGE) }, (_, b) => ({
      gatewayId: "g",
      count: Math.min(PER_MESSAGE, flushRows - b * PER_MESSAGE),
      messages: 1,
      receivedAtMs: Date.now(),
    }));
    const flush: FlushWire = {
      id,
      nowMs: Date.now(),
      pointId,
      ts,
      value: new Float64Array(flushRows).fill(6.5),
      quality: new Uint8Array(flushRows),
      texts: [],
      batches,
    };
    const start = performance.now();
    store.write(flush);
    flushMs.push(performance.now() - start);
    // Let the checkpointer's timer and messages run, as between the server's flushes.
    await new Promise((resolve) => setImmediate(resolve));
  }
  const seconds = (performance.now() - t0) / 1000;
  const actualPage = sqlite.pragma("page_size", { simple: true }) as number;
  const walMb = fs.statSync(`${file}-wal`).size / 1e6;
  await checkpointer.stop();
  sqlite.close();
  fs.rmSync(dir, { recursive: true, force: true });
  flushMs.sort((a, b) => a - b);
  const fmt = (n: number) => Math.round(n).toLocaleString("en-US");
  console.log(
    `page ${fmt(actualPage)} B${pageSize ? "" : " (the project's)"}: prefill ${fmt(env.BENCH_STORE_PREFILL)} rows at ${fmt(env.BENCH_STORE_PREFILL / prefillS)} rows/s; ` +
      `store ${fmt(env.BENCH_STORE_ROWS / seconds)} rows/s in ${fmt(flushRows)}-row flushes (flush p50 ${fmt(flushMs[Math.floor(flushMs.length / 2)])} ms, max ${fmt(flushMs[flushMs.length - 1])} ms); WAL at the end ${walMb.toFixed(0)} MB`,
  );
}

console.log(`Machine: ${os.cpus().length} × ${os.cpus()[0]?.model ?? "?"}, Node ${process.version}`);
console.log(`${GATEWAYS * POINTS_PER_GATEWAY} points, ${PER_MESSAGE}-reading messages in random gateway order`);
for (const size of env.BENCH_STORE_PAGE_SIZES.split(",").map(Number)) await run(size);
