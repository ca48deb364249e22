// Ingestion benchmark (`npm run bench:ingest`): the real server on a temp database, N gateways
// publishing JSON over loopback for a fixed time. Prints sustained readings/s committed,
// publish→PUBACK (= commit) and publish→browser-socket latency p50/p99, a 30-day trend request
// time while ingestion runs, and the raw better-sqlite3 batched insert rate on the same table
// shape and point count, measured in the same run. Settings: BENCH_* env vars below.
// The headline figures are steady state: the first BENCH_WARMUP_SECONDS of publishing (first
// sight of every point, rule monitors being built, JIT) are excluded and reported apart, with
// a per-second timeline so a start-up tail is told apart from a steady one.
import { execFileSync } from "node:child_process";
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
    BENCH_WARMUP_SECONDS: z.coerce.number().int().min(0).default(5),
    /** 1: print the per-second timeline. */
    BENCH_TIMELINE: z.coerce.number().int().min(0).max(1).default(1),
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

/** CPU seconds (user + system) a process used so far, from /proc (Linux only; NaN elsewhere). */
const clockTicks = (() => {
  try {
    return Number(execFileSync("getconf", ["CLK_TCK"]).toString().trim()) || 100;
  } catch {
    return 100;
  }
})();
function processCpuSeconds(pid: number | undefined): number {
  try {
    const stat = fs.readFileSync(`/proc/${pid}/stat`, "utf8");
    const fields = stat.slice(stat.lastIndexOf(")") + 2).split(" ");
    // Fields 14 and 15 of proc(5) (utime, stime); index 11 and 12 after the command name.
    return (Number(fields[11]) + Number(fields[12])) / clockTicks;
  } catch {
    return NaN;
  }
}
const fmt = (n: number) => (Number.isFinite(n) ? Math.round(n).toLocaleString("en-US") : "n/a");

async function main() {
  const pointCount = env.BENCH_GATEWAYS * env.BENCH_POINTS_PER_GATEWAY;
  console.log(`Machine: ${os.cpus().length} × ${os.cpus()[0]?.model ?? "cpu"}, ${Math.round(os.totalmem() / 2 ** 30)} GB, Node ${process.version}`);
  console.log(`Setup: ${env.BENCH_GATEWAYS} gateways × ${env.BENCH_POINTS_PER_GATEWAY} points = ${pointCount} points; target ${env.BENCH_RATE} readings/s in ${env.BENCH_PER_MESSAGE}-reading messages for ${env.BENCH_SECONDS} s`);

  // The server inherits this environment (tests/helpers/server.ts), so these can be varied per run.
  console.log(`Server settings: LIVE_PUSH_MS=${process.env.LIVE_PUSH_MS ?? "default (200)"}, INGEST_FLUSH_MS=${process.env.INGEST_FLUSH_MS ?? "default (50)"}, INGEST_MAX_BATCH_ROWS=${process.env.INGEST_MAX_BATCH_ROWS ?? "default (5000)"}`);

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
    // [ms since publishing started, latency ms]
    const socketSamples: Array<[number, number]> = [];
    let measuring = false;
    let started = 0;
    socket.on("site:values", (p: { values: Array<{ tsMs: number }> }) => {
      if (!measuring) return;
      const now = Date.now();
      for (const v of p.values) socketSamples.push([now - started, now - v.tsMs]);
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

    const ackSamples: Array<[number, number]> = [];
    const ackedPerSecond: number[] = [];
    let published = 0;
    let acked = 0;
    const perGatewayPerTick = (env.BENCH_RATE / env.BENCH_GATEWAYS) * 0.1; // readings per 100 ms
    const cursor = gws.map(() => 0);
    let carry = 0;
    const warmupMs = env.BENCH_WARMUP_SECONDS * 1000;
    const cpu: { server: number[]; client: number[] } = { server: [], client: [] };
    let ackedAtSteadyStart = 0;
    measuring = true;
    started = Date.now();
    const markSteady = setTimeout(() => {
      ackedAtSteadyStart = acked;
      cpu.server.push(processCpuSeconds(server.process.pid));
      cpu.client.push(process.cpuUsage().user / 1e6 + process.cpuUsage().system / 1e6);
    }, warmupMs);
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
            const at = Date.now() - started;
            ackSamples.push([at, performance.now() - t0]);
            const sec = Math.floor(at / 1000);
            ackedPerSecond[sec] = (ackedPerSecond[sec] ?? 0) + size;
          });
        }
      });
    }, 100);

    const trendSamples: Array<[number, number]> = [];
    const trendTimer = setInterval(async () => {
      const at = Date.now() - started;
      const t0 = performance.now();
      const res = await fetch(trendUrl, { headers: { cookie: cookie! } });
      await res.arrayBuffer();
      trendSamples.push([at, performance.now() - t0]);
    }, 1000);

    await new Promise((r) => setTimeout(r, warmupMs + env.BENCH_SECONDS * 1000));
    clearInterval(tick);
    clearInterval(trendTimer);
    clearTimeout(markSteady);
    const publishEnded = Date.now();
    const ackedAtEnd = acked;
    cpu.server.push(processCpuSeconds(server.process.pid));
    cpu.client.push(process.cpuUsage().user / 1e6 + process.cpuUsage().system / 1e6);
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
    const steadyS = env.BENCH_SECONDS;
    const steadyRate = (ackedAtEnd - ackedAtSteadyStart) / steadyS;
    const inSteady = (xs: Array<[number, number]>) => xs.filter(([t]) => t >= warmupMs && t < warmupMs + steadyS * 1000).map(([, v]) => v);
    const inWarmup = (xs: Array<[number, number]>) => xs.filter(([t]) => t < warmupMs).map(([, v]) => v);
    const all = (xs: Array<[number, number]>) => xs.map(([, v]) => v);
    const ack = inSteady(ackSamples);
    const sock = inSteady(socketSamples);
    const trend = inSteady(trendSamples);
    const serverCpuS = cpu.server[1] - cpu.server[0];
    const clientCpuS = cpu.client[1] - cpu.client[0];
    const lat = (xs: number[]) => `p50 ${pct(xs, 0.5).toFixed(0)} ms, p99 ${pct(xs, 0.99).toFixed(0)} ms, max ${xs.length ? xs.reduce((m, v) => (v > m ? v : m), -Infinity).toFixed(0) : "n/a"} ms`;

    if (env.BENCH_TIMELINE) {
      console.log("");
      console.log("Timeline (s since publishing started: acked readings, PUBACK p50/p99, socket p50/p99, trend ms)");
      const end = Math.ceil((drained - started) / 1000);
      for (let sec = 0; sec < end; sec++) {
        const win = (xs: Array<[number, number]>) => xs.filter(([t]) => t >= sec * 1000 && t < (sec + 1) * 1000).map(([, v]) => v);
        const a = win(ackSamples);
        const so = win(socketSamples);
        const tr = win(trendSamples);
        const mark = sec < env.BENCH_WARMUP_SECONDS ? " warm-up" : sec >= env.BENCH_WARMUP_SECONDS + steadyS ? " drain" : "";
        console.log(
          `  ${String(sec).padStart(3)}s ${fmt(ackedPerSecond[sec] ?? 0).padStart(7)}  ack ${pct(a, 0.5).toFixed(0).padStart(5)}/${pct(a, 0.99).toFixed(0).padStart(5)}  socket ${pct(so, 0.5).toFixed(0).padStart(5)}/${pct(so, 0.99).toFixed(0).padStart(5)}  trend ${tr.map((v) => v.toFixed(0)).join(",")}${mark}`,
        );
      }
    }
    console.log("");
    console.log(`Published ${fmt(published)} readings in ${((publishEnded - started) / 1000).toFixed(1)} s; all acknowledged after ${((drained - started) / 1000).toFixed(1)} s (${fmt(acked)} acked)`);
    console.log(`Rejected by the server: ${fmt(rejected)}`);
    console.log(`Committed: ${fmt(committed)} readings → ${fmt(sustained)} readings/s over the whole run incl. warm-up and drain (offered ${fmt(published / ((publishEnded - started) / 1000))}/s)`);
    console.log(`Steady state (after a ${env.BENCH_WARMUP_SECONDS} s warm-up, ${steadyS} s):`);
    console.log(`  acknowledged (= committed) ${fmt(steadyRate)} readings/s, offered ${fmt(env.BENCH_RATE)}/s; ${((steadyRate / raw1k) * 100).toFixed(0)} % of the raw 1,000-row rate (a ratio of the offered load unless the server fell behind)`);
    console.log(`  Publish → PUBACK (after commit): ${lat(ack)}`);
    console.log(`  Publish → browser socket (site:values): ${lat(sock)} (${fmt(sock.length)} values)`);
    console.log(`  30-day trend request while ingesting: ${lat(trend)} (${trend.length} requests)`);
    console.log(`  CPU: server ${((serverCpuS / steadyS) * 100).toFixed(0)} % of one core (${((serverCpuS / Math.max(1, ackedAtEnd - ackedAtSteadyStart)) * 1e6).toFixed(1)} µs per reading), bench client ${((clientCpuS / steadyS) * 100).toFixed(0)} %`);
    console.log(`Warm-up (first ${env.BENCH_WARMUP_SECONDS} s): PUBACK ${lat(inWarmup(ackSamples))}; socket ${lat(inWarmup(socketSamples))}`);
    console.log(`Whole run: PUBACK ${lat(all(ackSamples))}; socket ${lat(all(socketSamples))}; trend ${lat(all(trendSamples))}`);
  } finally {
    for (const c of clients) c.end(true);
    await server.stop();
    fs.rmSync(dataDir, { recursive: true, force: true });
  }
}

await main();
process.exit(0);
