// Ingestion benchmark (`npm run bench:ingest`): the real server on a temp database, N gateways
// publishing Liftline JSON over loopback. One run, three measurements:
//   1. raw better-sqlite3 batched inserts on the same table shape and point count (the yardstick),
//      into an empty table and, after the server stops, into tables as full as the server's
//      was at the start of each capacity run;
//   2. the portfolio: a fixed offered load (default 400 plants × 250 points every 5 s = 20,000
//      readings/s) with publish→PUBACK (= commit) and publish→browser-socket latency, and a
//      30-day trend request timed while ingestion runs;
//   3. capacity: every gateway keeps about 1,000 readings in flight and publishes the next
//      message as soon as one is acknowledged, so the committed rate is what the server sustains,
//      not what was offered; once with a plant's whole scan per message, once with 20 readings.
// Values are a chiller's design-day readings from the plant simulator with a little scatter, so
// rule checks see a healthy plant (an alarm storm on every plant at once is not the steady state).
// Settings: BENCH_* env vars below; the server inherits the environment (LIVE_PUSH_MS, INGEST_*).
import { execFileSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import Database from "better-sqlite3";
import mqtt from "mqtt";
import { quantile } from "simple-statistics";
import { io as ioClient } from "socket.io-client";
import { z } from "zod";
import { migrateDb, openDb } from "@/db/client";
import { equipment, gatewayPointMaps, gateways, organizations, points, sites } from "@/db/schema";
import { seedDemo } from "@/db/seed/demo";
import { hashGatewayPassword } from "@/gateway/credential-hash";
import { hourRebuilder } from "@/gateway/rollups";
import { hourOf } from "@/lib/rollup-buckets";
import { canonicalUnitOf, pointsByKind, quantities, type QuantityKey } from "@/lib/quantities";
import { runScenario } from "@/simulator";
import { DEMO_PASSWORD, signIn, startServer } from "../helpers/server";
import { connectBenchGateway, type BenchGatewayConnection } from "./light-gateway";
import { growTemplate, rawInsertRate, rawTemplate } from "./raw-table";

const env = z
  .object({
    BENCH_GATEWAYS: z.coerce.number().int().min(1).default(400),
    BENCH_POINTS_PER_GATEWAY: z.coerce.number().int().min(25).default(250),
    /** Offered load of the portfolio phase, readings/s. */
    BENCH_RATE: z.coerce.number().int().min(100).default(20_000),
    BENCH_SECONDS: z.coerce.number().int().min(3).default(20),
    BENCH_WARMUP_SECONDS: z.coerce.number().int().min(0).default(5),
    BENCH_PER_MESSAGE: z.coerce.number().int().min(1).max(5000).default(20),
    /** How often each gateway publishes what it read since its last publish (portfolio phase); a multiple of 100. */
    BENCH_GATEWAY_PUBLISH_MS: z.coerce.number().int().min(100).multipleOf(100).default(1000),
    /** Length of each capacity run; 0 skips them. */
    BENCH_CAPACITY_SECONDS: z.coerce.number().int().min(0).default(15),
    /**
     * Message sizes of the capacity runs, comma-separated: by default a plant's whole scan in
     * one message (as the portfolio's gateways send it), then 20-reading messages.
     */
    BENCH_CAPACITY_PER_MESSAGE: z
      .string()
      .default("")
      .transform((s, ctx) => {
        const sizes = (s || "").split(",").filter(Boolean).map(Number);
        if (sizes.some((n) => !Number.isInteger(n) || n < 1 || n > 5000))
          ctx.addIssue({ code: "custom", message: "sizes from 1 to 5000" });
        return sizes;
      }),
    /** Readings each gateway keeps unacknowledged during a capacity run (as whole messages). */
    BENCH_INFLIGHT_READINGS: z.coerce.number().int().min(1).default(1000),
    /** Sites the measuring browser socket watches (a technician's site page each). */
    BENCH_WATCHED_SITES: z.coerce.number().int().min(1).default(20),
    /** Rows of the raw insert yardstick. */
    BENCH_RAW_ROWS: z.coerce.number().int().min(10_000).default(1_000_000),
    /**
     * The gateways' MQTT client: "packet" writes mqtt-packet frames on plain sockets
     * (light-gateway.ts), "mqttjs" is the mqtt.js client, which costs the shared cores more.
     */
    BENCH_CLIENT: z.enum(["packet", "mqttjs"]).default("packet"),
    /** How often the 30-day trend request is timed (more often gives a finer tail, and adds load). */
    BENCH_TREND_INTERVAL_MS: z.coerce.number().int().min(100).default(1000),
    /** 1: print the per-second timeline. */
    BENCH_TIMELINE: z.coerce.number().int().min(0).max(1).default(1),
    /** 1: signal the server for a heap snapshot at the end of the portfolio phase (with LIFTLINE_TEST_NODE_ARGS=--heapsnapshot-signal=SIGUSR2). */
    BENCH_HEAP_SNAPSHOT: z.coerce.number().int().min(0).max(1).default(0),
    /** A file to write the server's own output to (e.g. with LIFTLINE_TEST_NODE_ARGS=--trace-gc). */
    BENCH_SERVER_LOG: z.string().optional(),
  })
  .parse(process.env);

const PASSWORD = "bench-gateway-password";
if (env.BENCH_CAPACITY_PER_MESSAGE.length === 0) env.BENCH_CAPACITY_PER_MESSAGE.push(env.BENCH_POINTS_PER_GATEWAY, 20);
const chillerKeys = pointsByKind.chiller.filter(
  (k) => quantities[k].measure !== "text" && quantities[k].measure !== "state",
);

/** A healthy chiller's readings (canonical units) from the simulator's design-day scenario. */
function designValues(): Map<QuantityKey, number | boolean> {
  const out = new Map<QuantityKey, number | boolean>();
  for (const sample of runScenario({ scenario: "design-steady", seed: 1, startMs: Date.now(), durationS: 5 })) {
    for (const r of sample.readings)
      if (r.equipment === "CH-1" && typeof r.value !== "string") out.set(r.quantity, r.value);
    break;
  }
  return out;
}

interface BenchGateway {
  id: string;
  siteId: string;
  names: string[];
  /** Base value of each point; numbers get ±0.2 % scatter on the wire. */
  values: Array<number | boolean>;
  /** The trend requests' point: the first this gateway maps. */
  firstPointId: number;
}

/**
 * 30 days of 1-minute rollups (43,200 rows) and their hours for the point the trend requests read (a daily
 * swing of ±3 % around its design value), so the request reads what a month of history costs.
 * The minutes up to now come from the running ingestion (open minutes from raw readings).
 */
function seedTrendHistory(sqlite: Database.Database, pointId: number, base: number) {
  const MINUTE_MS = 60_000;
  const end = Math.floor((Date.now() - 60_000) / MINUTE_MS) * MINUTE_MS;
  const insert = sqlite.prepare(
    "insert into readings_1m (point_id, bucket, min, max, sum, count, last, last_ts) values (?, ?, ?, ?, ?, ?, ?, ?)",
  );
  sqlite.transaction(() => {
    for (let bucket = end - 30 * 86_400_000; bucket < end; bucket += MINUTE_MS) {
      const v = base * (1 + 0.03 * Math.sin((2 * Math.PI * bucket) / 86_400_000));
      insert.run(pointId, bucket, v * 0.998, v * 1.002, v * 12, 12, v, bucket + 55_000);
    }
    // Their hours, as the writer keeps them beside the minutes.
    const rebuildHours = hourRebuilder(sqlite);
    for (let hour = hourOf(end - 30 * 86_400_000); hour < end; hour += 3_600_000) rebuildHours(pointId, hour);
  })();
}

/** `hash`: the product's own hash of PASSWORD, one for every bench gateway. */
function prepareDatabase(file: string, hash: string): BenchGateway[] {
  const db = openDb(file);
  migrateDb(db);
  seedDemo(db, DEMO_PASSWORD);
  const design = designValues();
  const gws: BenchGateway[] = [];
  db.transaction((tx) => {
    tx.insert(organizations).values({ id: "org-bench", name: "Bench customer", kind: "customer" }).run();
    for (let g = 0; g < env.BENCH_GATEWAYS; g++) {
      const siteId = `bench-${g}`;
      tx.insert(sites)
        .values({
          id: siteId,
          name: `Bench plant ${g}`,
          organizationId: "org-bench",
          kind: "Bench",
          address: "-",
          timeZone: "UTC",
        })
        .run();
      const id = `gw-bench${g}`;
      tx.insert(gateways)
        .values({ id, siteId, name: `Bench ${g}`, protocol: "json", username: id, passwordHash: hash })
        .run();
      const names: string[] = [];
      const values: Array<number | boolean> = [];
      let firstPointId = 0;
      for (let e = 0; names.length < env.BENCH_POINTS_PER_GATEWAY; e++) {
        const equipmentId = `${siteId}:CH-${e + 1}`;
        tx.insert(equipment)
          .values({ id: equipmentId, siteId, tag: `CH-${e + 1}`, name: `Chiller ${e + 1}`, kind: "chiller" })
          .run();
        for (const key of chillerKeys) {
          if (names.length >= env.BENCH_POINTS_PER_GATEWAY) break;
          const p = tx
            .insert(points)
            .values({
              equipmentId,
              key,
              quantity: key,
              unit: canonicalUnitOf(key),
              brickClass: quantities[key].brickClass,
              expectedIntervalS: 5,
            })
            .returning({ id: points.id })
            .get();
          if (names.length === 0) firstPointId = p.id;
          const name = `P${names.length}`;
          names.push(name);
          values.push(design.get(key) ?? 0);
          const unit = quantities[key].measure === "boolean" ? "bool" : canonicalUnitOf(key);
          tx.insert(gatewayPointMaps).values({ gatewayId: id, gatewayPoint: name, pointId: p.id, unit }).run();
        }
      }
      gws.push({ id, siteId, names, values, firstPointId });
    }
  });
  seedTrendHistory(db.$client, gws[0].firstPointId, typeof gws[0].values[0] === "number" ? gws[0].values[0] : 1);
  db.$client.close();
  return gws;
}

const pct = (xs: number[], q: number) => (xs.length ? quantile(xs, q) : NaN);
const fmt = (n: number) => (Number.isFinite(n) ? Math.round(n).toLocaleString("en-US") : "n/a");
const lat = (xs: number[]) =>
  `p50 ${pct(xs, 0.5).toFixed(0)} ms, p99 ${pct(xs, 0.99).toFixed(0)} ms, max ${xs.length ? xs.reduce((m, v) => (v > m ? v : m), -Infinity).toFixed(0) : "n/a"} ms`;
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

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
const ownCpuSeconds = () => {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1e6;
};

/** Waits (at most 30 s) until the server used under a tenth of a core for a whole second: the previous phase's checkpoints and rollups are done. */
async function serverIdle(pid: number | undefined) {
  const until = Date.now() + 30_000;
  for (let before = processCpuSeconds(pid); Date.now() < until;) {
    await sleep(1000);
    const now = processCpuSeconds(pid);
    // Also done when CPU time cannot be read (NaN off Linux): nothing to wait for then.
    if (!(now - before >= 0.1)) return;
    before = now;
  }
}

/** Readings in the server's table (read while the server is idle; a count over the whole table). */
function storedReadings(file: string): number {
  const db = new Database(file, { readonly: true });
  try {
    return (db.prepare("select count(*) as n from readings").get() as { n: number }).n;
  } finally {
    db.close();
  }
}

/** Samples are [ms since the phase started, value]. */
type Samples = Array<[number, number]>;

/**
 * One gateway's publisher: readings cycle through its points; a point's timestamp only repeats
 * after a full cycle, and it is the publish time, so a socket update's age is its latency.
 */
function makePublisher(g: BenchGateway, client: BenchGatewayConnection) {
  let cursor = 0;
  // The JSON is written as text, not built as objects and stringified: the bench client shares
  // the 2 cores with the server, and every cycle it spends is one the server does not get.
  // The bytes are what JSON.stringify would write (names need no escaping).
  const heads = g.names.map((name) => `{"point":"${name}","value":`);
  const topic = `liftline/${g.id}/readings`;
  return (count: number, onAck: (readings: number, ms: number) => void) => {
    const now = Date.now();
    let body = `{"sentAt":"${new Date(now).toISOString()}","readings":[`;
    let isoMs = NaN;
    let iso = "";
    for (let k = 0; k < count; k++) {
      const idx = cursor % g.names.length;
      const cycle = Math.floor(cursor / g.names.length);
      cursor++;
      const base = g.values[idx];
      // ±0.2 % scatter (deterministic), rounded like a controller reports it.
      const value =
        typeof base === "boolean"
          ? base
          : Math.round(base * (1 + (((cursor * 7919) % 401) - 200) / 100_000) * 1000) / 1000;
      const tsMs = now + (cycle % 1000);
      if (tsMs !== isoMs) {
        isoMs = tsMs;
        iso = new Date(tsMs).toISOString();
      }
      body += `${k ? "," : ""}${heads[idx]}${value},"ts":"${iso}"}`;
    }
    body += "]}";
    const t0 = performance.now();
    client.publish(topic, body, () => onAck(count, performance.now() - t0));
  };
}

function connectGateway(url: string, id: string): Promise<BenchGatewayConnection> {
  if (env.BENCH_CLIENT === "packet") return connectBenchGateway(url, { username: id, password: PASSWORD });
  return new Promise((resolve, reject) => {
    const c = mqtt.connect(url, {
      username: id,
      password: PASSWORD,
      clientId: id,
      protocolVersion: 4,
      reconnectPeriod: 0,
      connectTimeout: 120_000,
    });
    c.once("error", reject);
    c.once("connect", () =>
      resolve({
        publish: (topic, payload, onAck) => c.publish(topic, payload, { qos: 1 }, (err) => (err ? undefined : onAck())),
        end: () => c.end(true),
      }),
    );
  });
}

async function main() {
  const pointCount = env.BENCH_GATEWAYS * env.BENCH_POINTS_PER_GATEWAY;
  console.log(
    `Machine: ${os.cpus().length} × ${os.cpus()[0]?.model ?? "cpu"}, ${Math.round(os.totalmem() / 2 ** 30)} GB, Node ${process.version}`,
  );
  console.log(
    `Setup: ${env.BENCH_GATEWAYS} gateways × ${env.BENCH_POINTS_PER_GATEWAY} points = ${fmt(pointCount)} points, at most ${env.BENCH_PER_MESSAGE} readings a message; in the portfolio phase each gateway publishes every ${env.BENCH_GATEWAY_PUBLISH_MS} ms; gateway client: ${env.BENCH_CLIENT === "packet" ? "mqtt-packet frames on plain sockets" : "mqtt.js"}`,
  );
  console.log(
    `Server settings: LIVE_PUSH_MS=${process.env.LIVE_PUSH_MS ?? "default"}, INGEST_FLUSH_MS=${process.env.INGEST_FLUSH_MS ?? "default"}, INGEST_MAX_BATCH_ROWS=${process.env.INGEST_MAX_BATCH_ROWS ?? "default"}`,
  );

  // The yardstick, with the machine to itself: three trials of each transaction size now, on
  // a table as empty as the server's, and three more for each capacity run once the server has
  // stopped, on a table holding as many readings as the server's did when that run began. Each
  // capacity run is compared with the median of its own trials: raw inserts slow down as the
  // table grows (on this VM from about 760,000 rows/s into an empty table to about 230,000 rows/s
  // with 6.6 million readings in it), so a yardstick on an empty table measured a regime the
  // server was no longer in. The ratios against the empty table's trials are printed too.
  const template = rawTemplate(pointCount);
  const spread = (xs: number[]) => xs.map(fmt).join(", ");
  const yardstick = async (when: string, tableRows: number) => {
    growTemplate(template, tableRows);
    const k1: number[] = [];
    const k5: number[] = [];
    for (let t = 0; t < 3; t++) k1.push(await rawInsertRate(template, 1000, env.BENCH_RAW_ROWS));
    for (let t = 0; t < 3; t++) k5.push(await rawInsertRate(template, 5000, env.BENCH_RAW_ROWS));
    console.log(
      `Raw better-sqlite3 insert ${when} (same table, ${fmt(pointCount)} points, ${fmt(tableRows)} readings already stored, ${fmt(env.BENCH_RAW_ROWS)} rows inserted, WAL, synchronous=NORMAL, background checkpoint): 1,000-row transactions ${spread(k1)} rows/s; 5,000-row transactions ${spread(k5)} rows/s`,
    );
    return { k1: quantile(k1, 0.5), k5: quantile(k5, 0.5) };
  };
  const emptyTable = await yardstick("into an empty table, before the server starts", 0);

  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "liftline-bench-"));
  const gws = prepareDatabase(path.join(dataDir, "liftline.db"), await hashGatewayPassword(PASSWORD));
  const server = await startServer({ dataDir, env: { GATEWAY_MAX_MSGS_PER_S: "100000" } });
  const clients: BenchGatewayConnection[] = [];
  try {
    const { cookie } = await signIn(server.url, "admin@tallgrass.example");
    // The measuring browser: site pages of a sample of plants, each in its own room.
    const socket = ioClient(server.url, {
      extraHeaders: { cookie: cookie!, origin: server.url },
      transports: ["websocket"],
    });
    await new Promise<void>((resolve, reject) => {
      socket.once("connect", () => resolve());
      socket.once("connect_error", reject);
    });
    const step = Math.max(1, Math.floor(gws.length / env.BENCH_WATCHED_SITES));
    for (let g = 0; g < gws.length; g += step) await socket.emitWithAck("site:join", { siteId: gws[g].siteId });
    let socketSamples: Samples = [];
    let phaseStart = 0;
    socket.on("site:values", (p: { values: Array<{ tsMs: number }> }) => {
      const now = Date.now();
      for (const v of p.values) socketSamples.push([now - phaseStart, now - v.tsMs]);
    });

    clients.push(...(await Promise.all(gws.map((g) => connectGateway(server.mqttUrl, g.id)))));
    const publishers = gws.map((g, i) => makePublisher(g, clients[i]));

    // Warm the series route (a development server compiles it on first use), then time it idle.
    const trendUrl = `${server.url}/api/points/${gws[0].firstPointId}/series?from=${Date.now() - 30 * 86_400_000}&to=${Date.now()}&maxPoints=1000`;
    const first = (await (await fetch(trendUrl, { headers: { cookie: cookie! } })).json()) as {
      series: { time: number[]; count: number[] };
    };
    console.log(
      `30-day trend of point ${gws[0].firstPointId}: ${first.series.time.length} buckets over ${fmt(first.series.count.reduce((a, b) => a + b, 0))} readings`,
    );
    const idleTrend: number[] = [];
    for (let i = 0; i < 20; i++) {
      const t0 = performance.now();
      await (await fetch(trendUrl, { headers: { cookie: cookie! } })).arrayBuffer();
      idleTrend.push(performance.now() - t0);
    }
    console.log(`30-day trend request with no ingestion: ${lat(idleTrend)}`);
    const trendSamples: Samples = [];
    // Off while a yardstick trial holds this process (its idle keep-alive sockets close meanwhile).
    let trendPaused = false;
    let trendFailures = 0;
    const trendTimer = setInterval(async () => {
      if (trendPaused) return;
      const at = Date.now() - phaseStart;
      const t0 = performance.now();
      try {
        // One retry: the first request after a pause (below) may find its kept-alive socket closed.
        const res = await fetch(trendUrl, { headers: { cookie: cookie! } }).catch(() =>
          fetch(trendUrl, { headers: { cookie: cookie! } }),
        );
        await res.arrayBuffer();
        if (!res.ok) throw new Error(`HTTP ${res.status}`);
        trendSamples.push([at, performance.now() - t0]);
      } catch (err) {
        trendFailures++;
        console.log(`  trend request failed: ${String(err)}`);
      }
    }, env.BENCH_TREND_INTERVAL_MS);

    // ---- Phase 1: the portfolio's offered load ---------------------------------------------
    const warmupMs = env.BENCH_WARMUP_SECONDS * 1000;
    const steadyMs = env.BENCH_SECONDS * 1000;
    const ackSamples: Samples = [];
    const ackedPerSecond: number[] = [];
    let published = 0;
    let acked = 0;
    const cpu = { server: [] as number[], client: [] as number[] };
    let ackedAtSteadyStart = 0;
    phaseStart = Date.now();
    socketSamples = [];
    const onAck = (n: number, ms: number) => {
      acked += n;
      const at = Date.now() - phaseStart;
      ackSamples.push([at, ms]);
      const sec = Math.floor(at / 1000);
      ackedPerSecond[sec] = (ackedPerSecond[sec] ?? 0) + n;
    };
    const markSteady = setTimeout(() => {
      ackedAtSteadyStart = acked;
      cpu.server.push(processCpuSeconds(server.process.pid));
      cpu.client.push(ownCpuSeconds());
    }, warmupMs);
    // Each gateway publishes once per BENCH_GATEWAY_PUBLISH_MS what it read meanwhile, in
    // messages of at most BENCH_PER_MESSAGE; gateways are spread evenly over that period.
    const ticksPerPublish = env.BENCH_GATEWAY_PUBLISH_MS / 100;
    const perGatewayPerPublish = (env.BENCH_RATE / env.BENCH_GATEWAYS) * (env.BENCH_GATEWAY_PUBLISH_MS / 1000);
    const carry = publishers.map(() => 0);
    let tickNo = 0;
    const tick = setInterval(() => {
      const slot = tickNo++ % ticksPerPublish;
      publishers.forEach((publish, g) => {
        if (g % ticksPerPublish !== slot) return;
        carry[g] += perGatewayPerPublish;
        const n = Math.floor(carry[g]);
        carry[g] -= n;
        for (let sent = 0; sent < n; sent += env.BENCH_PER_MESSAGE) {
          const size = Math.min(env.BENCH_PER_MESSAGE, n - sent);
          published += size;
          publish(size, onAck);
        }
      });
    }, 100);
    await sleep(warmupMs + steadyMs);
    clearInterval(tick);
    clearTimeout(markSteady);
    if (env.BENCH_HEAP_SNAPSHOT) server.process.kill("SIGUSR2");
    const ackedAtEnd = acked;
    cpu.server.push(processCpuSeconds(server.process.pid));
    cpu.client.push(ownCpuSeconds());
    const drainUntil = Date.now() + 30_000;
    while (acked < published && Date.now() < drainUntil) await sleep(50);
    const portfolioEnded = Date.now();
    const portfolioSockets = socketSamples;
    const portfolioTrendFailures = trendFailures;

    if (env.BENCH_TIMELINE) {
      console.log("");
      console.log("Portfolio timeline (s: acked readings, PUBACK p50/p99 ms, socket p50/p99 ms, trend ms)");
      const end = Math.ceil((portfolioEnded - phaseStart) / 1000);
      for (let sec = 0; sec < end; sec++) {
        const win = (xs: Samples) => xs.filter(([t]) => t >= sec * 1000 && t < (sec + 1) * 1000).map(([, v]) => v);
        const a = win(ackSamples);
        const so = win(portfolioSockets);
        const tr = win(trendSamples);
        const mark = sec < env.BENCH_WARMUP_SECONDS ? " warm-up" : sec * 1000 >= warmupMs + steadyMs ? " drain" : "";
        console.log(
          `  ${String(sec).padStart(3)}s ${fmt(ackedPerSecond[sec] ?? 0).padStart(7)}  ack ${pct(a, 0.5).toFixed(0).padStart(5)}/${pct(a, 0.99).toFixed(0).padStart(5)}  socket ${pct(so, 0.5).toFixed(0).padStart(5)}/${pct(so, 0.99).toFixed(0).padStart(5)}  trend ${tr.map((v) => v.toFixed(0)).join(",")}${mark}`,
        );
      }
    }
    const inSteady = (xs: Samples) => xs.filter(([t]) => t >= warmupMs && t < warmupMs + steadyMs).map(([, v]) => v);
    const inWarmup = (xs: Samples) => xs.filter(([t]) => t < warmupMs).map(([, v]) => v);
    const steadyRate = (ackedAtEnd - ackedAtSteadyStart) / env.BENCH_SECONDS;
    const sock = inSteady(portfolioSockets);
    const trend = inSteady(trendSamples);
    const serverCpuS = cpu.server[1] - cpu.server[0];
    const clientCpuS = cpu.client[1] - cpu.client[0];
    console.log("");
    console.log(
      `Portfolio: offered ${fmt(env.BENCH_RATE)} readings/s for ${env.BENCH_WARMUP_SECONDS} s warm-up + ${env.BENCH_SECONDS} s steady; ${fmt(published)} published, ${fmt(acked)} acknowledged`,
    );
    console.log(`  steady state: ${fmt(steadyRate)} readings/s acknowledged (= committed)`);
    console.log(`  publish → PUBACK (after commit): ${lat(inSteady(ackSamples))}`);
    console.log(
      `  publish → browser socket (site:values, ${env.BENCH_WATCHED_SITES} watched sites): ${lat(sock)} (${fmt(sock.length)} values)`,
    );
    console.log(`  30-day trend request while ingesting: ${lat(trend)} (${trend.length} requests)`);
    console.log(
      `  CPU: server ${((serverCpuS / env.BENCH_SECONDS) * 100).toFixed(0)} % of one core (${((serverCpuS / Math.max(1, ackedAtEnd - ackedAtSteadyStart)) * 1e6).toFixed(1)} µs per reading), bench client ${((clientCpuS / env.BENCH_SECONDS) * 100).toFixed(0)} %`,
    );
    console.log(`  warm-up: PUBACK ${lat(inWarmup(ackSamples))}; socket ${lat(inWarmup(portfolioSockets))}`);

    // ---- Phase 2: capacity, once per message size ---------------------------------------
    const capacities: Array<{ perMessage: number; rate: number; tableRows: number }> = [];
    for (const perMessage of env.BENCH_CAPACITY_SECONDS > 0 ? env.BENCH_CAPACITY_PER_MESSAGE : []) {
      console.log("");
      // No trend requests while waiting for the server to go idle (they would keep it busy)
      // and while the bench blocks on counting the table.
      trendPaused = true;
      await serverIdle(server.process.pid);
      const tableRows = storedReadings(server.databasePath);
      trendPaused = false;
      const inflight = Math.max(1, Math.ceil(env.BENCH_INFLIGHT_READINGS / perMessage));
      const capAcks: Samples = [];
      const capTrend: number[] = [];
      let capAcked = 0;
      let capSent = 0;
      let running = true;
      phaseStart = Date.now();
      socketSamples = [];
      const capWarmMs = 3000;
      let ackedAtStart = 0;
      const capCpu = { server: [] as number[], client: [] as number[] };
      const startMark = setTimeout(() => {
        ackedAtStart = capAcked;
        capCpu.server.push(processCpuSeconds(server.process.pid));
        capCpu.client.push(ownCpuSeconds());
      }, capWarmMs);
      const trendStart = trendSamples.length;
      publishers.forEach((publish) => {
        const again = (n: number, ms: number) => {
          capAcked += n;
          capAcks.push([Date.now() - phaseStart, ms]);
          if (!running) return;
          capSent += perMessage;
          publish(perMessage, again);
        };
        for (let k = 0; k < inflight; k++) {
          capSent += perMessage;
          publish(perMessage, again);
        }
      });
      await sleep(capWarmMs + env.BENCH_CAPACITY_SECONDS * 1000);
      running = false;
      clearTimeout(startMark);
      const capEnd = capAcked;
      capCpu.server.push(processCpuSeconds(server.process.pid));
      capCpu.client.push(ownCpuSeconds());
      const capacity = (capEnd - ackedAtStart) / env.BENCH_CAPACITY_SECONDS;
      capacities.push({ perMessage, rate: capacity, tableRows });
      for (const [t, v] of trendSamples.slice(trendStart)) if (t >= capWarmMs) capTrend.push(v);
      const inCap = (xs: Samples) => xs.filter(([t]) => t >= capWarmMs).map(([, v]) => v);
      const cs = capCpu.server[1] - capCpu.server[0];
      const cc = capCpu.client[1] - capCpu.client[0];
      console.log("");
      console.log(
        `Capacity with ${perMessage}-reading messages: every gateway keeps ${inflight} in flight; ${env.BENCH_CAPACITY_SECONDS} s measured after a ${capWarmMs / 1000} s ramp`,
      );
      console.log(
        `  committed ${fmt(capacity)} readings/s into a table that held ${fmt(tableRows)} readings at the start (ratios to the yardstick below, after the server stops)`,
      );
      console.log(`  publish → PUBACK: ${lat(inCap(capAcks))}; publish → browser socket: ${lat(inCap(socketSamples))}`);
      console.log(`  30-day trend request: ${lat(capTrend)} (${capTrend.length} requests)`);
      console.log(
        `  CPU: server ${((cs / env.BENCH_CAPACITY_SECONDS) * 100).toFixed(0)} % of one core (${((cs / Math.max(1, capEnd - ackedAtStart)) * 1e6).toFixed(1)} µs per reading), bench client ${((cc / env.BENCH_CAPACITY_SECONDS) * 100).toFixed(0)} %`,
      );
      const until = Date.now() + 30_000;
      while (capAcked < capSent && Date.now() < until) await sleep(50);
    }
    clearInterval(trendTimer);
    socket.close();

    const db = new Database(server.databasePath, { readonly: true });
    const committed = (db.prepare("select count(*) as n from readings").get() as { n: number }).n;
    const rejected = (db.prepare("select coalesce(sum(count), 0) as n from gateway_rejections").get() as { n: number })
      .n;
    // Healthy plants should raise nothing; a storm of alarms would be measuring something else.
    const raised = db
      .prepare(
        "select rule_id as rule, count(*) as n from alarms where site_id like 'bench-%' and (condition_active = 1 or state != 'normal') group by rule_id",
      )
      .all() as Array<{ rule: string; n: number }>;
    db.close();
    console.log(
      `Alarms on the bench plants: ${raised.length ? raised.map((r) => `${r.rule} × ${r.n}`).join(", ") : "none"}`,
    );
    console.log("");
    console.log(`Stored: ${fmt(committed)} readings; rejected by the server: ${fmt(rejected)}`);
    // The rest needs the machine to itself: the server stops, then the yardstick on tables the
    // size of the server's at the start of each capacity run. (Run between the phases, its
    // minute of silence raised a lost-communication alarm on every bench plant.)
    for (const c of clients) c.end();
    await server.stop();
    const ratios = [];
    for (const c of capacities) {
      const sameSize = await yardstick(
        `for the ${c.perMessage}-reading capacity run, after the server stopped`,
        c.tableRows,
      );
      const of = (rate: number) => `${((c.rate / rate) * 100).toFixed(0)} %`;
      console.log(
        `  ${c.perMessage}-reading capacity ${fmt(c.rate)}/s = ${of(sameSize.k1)} of the 1,000-row rate and ${of(sameSize.k5)} of the 5,000-row rate on that table (medians of 3 trials); ${of(emptyTable.k1)} and ${of(emptyTable.k5)} of the rates into an empty table`,
      );
      ratios.push({ ...c, raw1k: sameSize.k1 });
    }
    console.log("");
    console.log("Goals:");
    const p99 = pct(sock, 0.99);
    console.log(
      `  portfolio ${fmt(env.BENCH_RATE)}/s sustained with publish → browser p99 ≤ 250 ms: ${steadyRate >= env.BENCH_RATE * 0.98 && p99 <= 250 ? "met" : "NOT met"} (${fmt(steadyRate)}/s, p99 ${p99.toFixed(0)} ms)`,
    );
    for (const c of ratios) {
      console.log(
        `  end-to-end ≥ 40 % of the raw 1,000-row insert rate on a table of the same size (${fmt(c.tableRows)} readings), ${c.perMessage}-reading messages: ${c.rate >= 0.4 * c.raw1k ? "met" : "NOT met"} (${((c.rate / c.raw1k) * 100).toFixed(0)} %; ${((c.rate / emptyTable.k1) * 100).toFixed(0)} % of the rate into an empty table)`,
      );
    }
    const trendMax = Math.max(...trend);
    console.log(
      `  30-day trend ≤ 50 ms while ingesting (portfolio phase): ${trendMax <= 50 && portfolioTrendFailures === 0 ? "met" : "NOT met"} (max ${trendMax.toFixed(0)} ms${portfolioTrendFailures ? `, ${portfolioTrendFailures} requests failed` : ""})`,
    );
  } finally {
    for (const c of clients) c.end();
    await server.stop();
    if (env.BENCH_SERVER_LOG) fs.writeFileSync(env.BENCH_SERVER_LOG, server.output());
    fs.rmSync(dataDir, { recursive: true, force: true });
    template.remove();
  }
}

await main();
process.exit(0);
