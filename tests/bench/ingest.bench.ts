// Ingestion benchmark (`npm run bench:ingest`): the real server on a temp database, N gateways
// publishing JSON over loopback for a fixed time. Prints sustained readings/s committed,
// publish→PUBACK (= commit) and publish→browser-socket latency p50/p99, a 30-day trend request
// time while ingestion runs, and the raw better-sqlite3 batched insert rate on the same table
// shape and point count, measured in the same run. Settings: BENCH_* env vars below.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import bcrypt from "bcryptjs";
import Database from "better-sqlite3";
import mqtt, { type MqttClient } from "mqtt";
import { quantile } from "simple-statistics";
import { io as ioClient } from "socket.io-client";
import { z } from "zod";
import { migrateDb, openDb } from "@/db/client";
import { equipment, gatewayPointMaps, gateways, organizations, points, sites } from "@/db/schema";
import { seedDemo } from "@/db/seed/demo";
import { canonicalUnitOf, pointsByKind, quantities } from "@/lib/quantities";
import { DEMO_PASSWORD, signIn, startServer } from "../helpers/server";

const env = z
  .object({
    BENCH_GATEWAYS: z.coerce.number().int().min(1).default(40),
    BENCH_POINTS_PER_GATEWAY: z.coerce.number().int().min(25).default(500),
    BENCH_RATE: z.coerce.number().int().min(100).default(20_000),
    BENCH_SECONDS: z.coerce.number().int().min(3).default(20),
    BENCH_PER_MESSAGE: z.coerce.number().int().min(1).max(5000).default(20),
  })
  .parse(process.env);

const chillerKeys = pointsByKind.chiller.filter((k) => quantities[k].measure !== "text" && quantities[k].measure !== "state");
const PASSWORD = "bench-gateway-password";

function prepareDatabase(file: string) {
  const db = openDb(file);
  migrateDb(db);
  seedDemo(db, DEMO_PASSWORD);
  const hash = bcrypt.hashSync(PASSWORD, 10);
  const gws: Array<{ id: string; names: string[]; bools: boolean[] }> = [];
  db.transaction((tx) => {
    tx.insert(organizations).values({ id: "org-bench", name: "Bench customer", kind: "customer" }).run();
    for (let g = 0; g < env.BENCH_GATEWAYS; g++) {
      const siteId = `bench-${g}`;
      tx.insert(sites).values({ id: siteId, name: `Bench plant ${g}`, organizationId: "org-bench", kind: "Bench", address: "-", timeZone: "UTC" }).run();
      const id = `gw-bench${g}`;
      tx.insert(gateways).values({ id, siteId, name: `Bench ${g}`, protocol: "json", username: id, passwordHash: hash }).run();
      const names: string[] = [];
      const bools: boolean[] = [];
      for (let e = 0; names.length < env.BENCH_POINTS_PER_GATEWAY; e++) {
        const equipmentId = `${siteId}:CH-${e + 1}`;
        tx.insert(equipment).values({ id: equipmentId, siteId, tag: `CH-${e + 1}`, name: `Chiller ${e + 1}`, kind: "chiller" }).run();
        for (const key of chillerKeys) {
          if (names.length >= env.BENCH_POINTS_PER_GATEWAY) break;
          const p = tx
            .insert(points)
            .values({ equipmentId, key, quantity: key, unit: canonicalUnitOf(key), brickClass: quantities[key].brickClass, expectedIntervalS: 5 })
            .returning({ id: points.id })
            .get();
          const name = `P${names.length}`;
          names.push(name);
          bools.push(quantities[key].measure === "boolean");
          const unit = quantities[key].measure === "boolean" ? "bool" : canonicalUnitOf(key) === "degC" ? "degC" : canonicalUnitOf(key);
          tx.insert(gatewayPointMaps).values({ gatewayId: id, gatewayPoint: name, pointId: p.id, unit }).run();
        }
      }
      gws.push({ id, names, bools });
    }
  });
  db.$client.close();
  return gws;
}

/** Raw better-sqlite3 on the migrated table shape: batched INSERT OR IGNORE spread over the same points. */
function rawInsertRate(pointCount: number, batch: number, rows: number): number {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "liftline-raw-"));
  const db = openDb(path.join(dir, "raw.db"));
  migrateDb(db);
  const sqlite: Database.Database = db.$client;
  sqlite.exec("insert into organizations (id, name, kind) values ('o','o','customer'); insert into sites (id,name,organization_id,kind,address,time_zone) values ('s','s','o','k','a','UTC'); insert into equipment (id, site_id, tag, name, kind) values ('e','s','T','n','chiller')");
  const ip = sqlite.prepare("insert into points (equipment_id, key, quantity, unit, brick_class) values ('e', ?, 'compressor_power', 'kW', 'x')");
  sqlite.transaction(() => {
    for (let i = 0; i < pointCount; i++) ip.run(`k${i}`);
  })();
  const ins = sqlite.prepare("insert or ignore into readings (point_id, ts, value, text, quality) values (?, ?, ?, null, 0)");
  const tx = sqlite.transaction((start: number) => {
    for (let i = start; i < start + batch; i++) ins.run((i % pointCount) + 1, 1_700_000_000_000 + Math.floor(i / pointCount) * 1000, i * 0.5);
  });
  const t0 = performance.now();
  for (let i = 0; i < rows; i += batch) tx(i);
  const s = (performance.now() - t0) / 1000;
  sqlite.close();
  fs.rmSync(dir, { recursive: true, force: true });
  return rows / s;
}

const pct = (xs: number[], q: number) => (xs.length ? quantile(xs, q) : NaN);
const fmt = (n: number) => (Number.isFinite(n) ? Math.round(n).toLocaleString("en-US") : "n/a");

async function main() {
  const pointCount = env.BENCH_GATEWAYS * env.BENCH_POINTS_PER_GATEWAY;
  console.log(`Machine: ${os.cpus().length} × ${os.cpus()[0]?.model ?? "cpu"}, ${Math.round(os.totalmem() / 2 ** 30)} GB, Node ${process.version}`);
  console.log(`Setup: ${env.BENCH_GATEWAYS} gateways × ${env.BENCH_POINTS_PER_GATEWAY} points = ${pointCount} points; target ${env.BENCH_RATE} readings/s in ${env.BENCH_PER_MESSAGE}-reading messages for ${env.BENCH_SECONDS} s`);

  const raw1k = rawInsertRate(pointCount, 1000, 300_000);
  const raw5k = rawInsertRate(pointCount, 5000, 300_000);
  console.log(`Raw better-sqlite3 insert (same table, WAL, synchronous=NORMAL): ${fmt(raw1k)} rows/s in 1,000-row transactions, ${fmt(raw5k)} rows/s in 5,000-row transactions`);

  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "liftline-bench-"));
  const gws = prepareDatabase(path.join(dataDir, "liftline.db"));
  const server = await startServer({ dataDir, env: { GATEWAY_MAX_MSGS_PER_S: "100000" } });
  const clients: MqttClient[] = [];
  try {
    const { cookie } = await signIn(server.url, "admin@tallgrass.example");
    const socket = ioClient(server.url, { extraHeaders: { cookie: cookie! }, transports: ["websocket"] });
    await new Promise<void>((resolve, reject) => {
      socket.once("connect", () => resolve());
      socket.once("connect_error", reject);
    });
    await new Promise((resolve) => socket.emit("board:join", resolve));
    const socketLatency: number[] = [];
    let measuring = false;
    socket.on("site:values", (p: { values: Array<{ tsMs: number }> }) => {
      if (!measuring) return;
      const now = Date.now();
      for (const v of p.values) socketLatency.push(now - v.tsMs);
    });

    for (const g of gws) {
      clients.push(
        await new Promise<MqttClient>((resolve, reject) => {
          const c = mqtt.connect(server.mqttUrl, { username: g.id, password: PASSWORD, clientId: g.id, protocolVersion: 4, reconnectPeriod: 0 });
          c.once("connect", () => resolve(c));
          c.once("error", reject);
        }),
      );
    }

    // Warm the series route (development mode compiles it on first use).
    const trendUrl = `${server.url}/api/points/1/series?from=${Date.now() - 30 * 86_400_000}&to=${Date.now()}&maxPoints=1000`;
    await fetch(trendUrl, { headers: { cookie: cookie! } });

    const ackLatency: number[] = [];
    let published = 0;
    let acked = 0;
    const perGatewayPerTick = (env.BENCH_RATE / env.BENCH_GATEWAYS) * 0.1; // readings per 100 ms
    const cursor = gws.map(() => 0);
    let carry = 0;
    measuring = true;
    const started = Date.now();
    const tick = setInterval(() => {
      carry += perGatewayPerTick;
      const n = Math.floor(carry);
      carry -= n;
      const now = Date.now();
      gws.forEach((g, gi) => {
        for (let sent = 0; sent < n; sent += env.BENCH_PER_MESSAGE) {
          const readings = [];
          for (let k = 0; k < Math.min(env.BENCH_PER_MESSAGE, n - sent); k++) {
            const idx = cursor[gi]++ % g.names.length;
            // ts = publish time, so a socket update's age is its publish→browser latency;
            // a point's ts only repeats after a full cycle of its gateway's points.
            readings.push({ point: g.names[idx], value: g.bools[idx] ? idx % 2 === 0 : (idx % 7) + 40, ts: new Date(now + Math.floor(cursor[gi] / g.names.length)).toISOString() });
          }
          const t0 = performance.now();
          published += readings.length;
          const size = readings.length;
          clients[gi].publish(`liftline/${g.id}/readings`, JSON.stringify({ sentAt: new Date(now).toISOString(), readings }), { qos: 1 }, (err) => {
            if (err) return;
            acked += size;
            ackLatency.push(performance.now() - t0);
          });
        }
      });
    }, 100);

    const trendTimes: number[] = [];
    const trendTimer = setInterval(async () => {
      const t0 = performance.now();
      const res = await fetch(trendUrl, { headers: { cookie: cookie! } });
      await res.arrayBuffer();
      trendTimes.push(performance.now() - t0);
    }, 2000);

    await new Promise((r) => setTimeout(r, env.BENCH_SECONDS * 1000));
    clearInterval(tick);
    clearInterval(trendTimer);
    const publishEnded = Date.now();
    const until = Date.now() + 30_000;
    while (acked < published && Date.now() < until) await new Promise((r) => setTimeout(r, 100));
    const drained = Date.now();
    measuring = false;
    socket.close();

    const db = new Database(server.databasePath, { readonly: true });
    const committed = (db.prepare("select count(*) as n from readings").get() as { n: number }).n;
    const rejected = (db.prepare("select coalesce(sum(count), 0) as n from gateway_rejections").get() as { n: number }).n;
    db.close();
    const seconds = (drained - started) / 1000;
    const sustained = committed / seconds;
    console.log("");
    console.log(`Published ${fmt(published)} readings in ${((publishEnded - started) / 1000).toFixed(1)} s; all acknowledged after ${((drained - started) / 1000).toFixed(1)} s (${fmt(acked)} acked)`);
    console.log(`Rejected by the server: ${fmt(rejected)}`);
    console.log(`Committed: ${fmt(committed)} readings → sustained ${fmt(sustained)} readings/s (offered ${fmt(published / ((publishEnded - started) / 1000))}/s; ${((sustained / raw1k) * 100).toFixed(0)} % of the raw 1,000-row rate)`);
    console.log(`Publish → PUBACK (after commit): p50 ${pct(ackLatency, 0.5).toFixed(0)} ms, p99 ${pct(ackLatency, 0.99).toFixed(0)} ms`);
    console.log(`Publish → browser socket (site:values): p50 ${pct(socketLatency, 0.5).toFixed(0)} ms, p99 ${pct(socketLatency, 0.99).toFixed(0)} ms (${fmt(socketLatency.length)} values)`);
    console.log(`30-day trend request while ingesting: p50 ${pct(trendTimes, 0.5).toFixed(0)} ms, max ${Math.max(...trendTimes).toFixed(0)} ms (${trendTimes.length} requests)`);
  } finally {
    for (const c of clients) c.end(true);
    await server.stop();
  }
}

await main();
process.exit(0);
