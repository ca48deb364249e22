import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterEach, describe, expect, it } from "vitest";
import { migrateDb, openDb, type Db } from "@/db/client";
import { gateways } from "@/db/schema";
import { seedDemo } from "@/db/seed/demo";
import { startPruner, type Pruner } from "@/gateway/pruner";
import { createBatchWriter } from "@/gateway/writer";
import type { Clock } from "@/lib/clock";

// Retention on a real migrated file database (WAL, the pragmas of db/client.ts) with the demo
// points and a fake clock: raw readings older than the raw retention and rollups older than
// theirs are deleted, everything at or after each cutoff is kept to the millisecond, latest
// values are never touched, and a large backlog is pruned in short slices so the event loop
// (and so ingestion) keeps running during the pass.

const DAY_MS = 86_400_000;
const MINUTE_MS = 60_000;
// A fixed "now" on a minute boundary, so rollup buckets line up with the cutoffs.
const NOW = Date.UTC(2026, 11, 1, 14, 0, 0);
const clock: Clock = { now: () => NOW };

const dirs: string[] = [];
const open: Array<{ db: Db; pruner?: Pruner }> = [];

afterEach(() => {
  for (const o of open.splice(0)) {
    o.pruner?.stop();
    o.db.$client.close();
  }
  for (const d of dirs.splice(0)) fs.rmSync(d, { recursive: true, force: true });
});

function setup(): Db {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "liftline-prune-"));
  dirs.push(dir);
  const db = openDb(path.join(dir, "liftline.db"));
  migrateDb(db);
  seedDemo(db, "unit-test-password");
  open.push({ db });
  return db;
}

function track(db: Db, pruner: Pruner): Pruner {
  const o = open.find((x) => x.db === db);
  if (o) o.pruner = pruner;
  return pruner;
}

function insertRaw(db: Db, rows: Array<[pointId: number, ts: number]>) {
  const st = db.$client.prepare("insert into readings (point_id, ts, value, text, quality) values (?, ?, ?, null, 0)");
  db.$client.transaction(() => {
    for (const [p, ts] of rows) st.run(p, ts, ts % 97);
  })();
}

/** The same buckets in both rollup tables (the pruner treats minutes and hours alike). */
function insertRollups(db: Db, rows: Array<[pointId: number, bucket: number]>) {
  const st = ["readings_1m", "readings_1h"].map((t) =>
    db.$client.prepare(
      `insert into ${t} (point_id, bucket, min, max, sum, count, last, last_ts) values (?, ?, 1, 2, 3, 2, 2, ?)`,
    ),
  );
  db.$client.transaction(() => {
    for (const [p, b] of rows) for (const s of st) s.run(p, b, b + 30_000);
  })();
}

const rawTs = (db: Db, pointId: number) =>
  (
    db.$client.prepare("select ts from readings where point_id = ? order by ts").all(pointId) as Array<{ ts: number }>
  ).map((r) => r.ts);
const rollupBuckets = (db: Db, pointId: number) =>
  (
    db.$client.prepare("select bucket from readings_1m where point_id = ? order by bucket").all(pointId) as Array<{
      bucket: number;
    }>
  ).map((r) => r.bucket);
const count = (db: Db, table: string) =>
  (db.$client.prepare(`select count(*) as n from ${table}`).get() as { n: number }).n;

/** Gaps between event-loop turns while `work` runs: setImmediate re-arms itself each turn. */
async function loopGaps<T>(work: () => Promise<T>): Promise<{ result: T; gaps: number[]; turns: number }> {
  let last = performance.now();
  const gaps: number[] = [];
  let turns = 0;
  let running = true;
  const tick = () => {
    const now = performance.now();
    // Turns while the pass pauses come every few µs; only stretches of work are of interest.
    if (now - last > 1) gaps.push(now - last);
    last = now;
    turns++;
    if (running) setImmediate(tick);
  };
  setImmediate(tick);
  const result = await work();
  running = false;
  // The stretch since the last turn counts too (a pass that never yields has no turn at all).
  gaps.push(performance.now() - last);
  return { result, gaps, turns };
}

describe("retention pruner", () => {
  it("deletes raw readings and rollups past their retention, keeps the rest and the latest values", async () => {
    const db = setup();
    const rawBefore = NOW - 14 * DAY_MS;
    const rollupBefore = NOW - 730 * DAY_MS;
    // Either side of each cutoff: `before - 1` is past retention, `before` itself is kept.
    const rawOld = [rawBefore - 30 * DAY_MS, rawBefore - 1];
    const rawKept = [rawBefore, rawBefore + 1, NOW - DAY_MS, NOW];
    const rollOld = [rollupBefore - 365 * DAY_MS, rollupBefore - MINUTE_MS];
    const rollKept = [rollupBefore, rollupBefore + MINUTE_MS, NOW - 30 * DAY_MS, NOW - MINUTE_MS];
    for (const p of [1, 2, 207]) {
      insertRaw(
        db,
        [...rawOld, ...rawKept].map((ts) => [p, ts]),
      );
      insertRollups(
        db,
        [...rollOld, ...rollKept].map((b) => [p, b]),
      );
    }
    // Point 3 went quiet 40 days ago: its old readings go, its latest value stays (the screen
    // shows it as stale, not as missing).
    insertRaw(db, [[3, NOW - 40 * DAY_MS]]);
    const st = db.$client.prepare(
      "insert into latest_values (point_id, ts, value, quality, received_at) values (?, ?, ?, 0, ?)",
    );
    st.run(1, NOW, 5, NOW);
    st.run(3, NOW - 40 * DAY_MS, 7, NOW - 40 * DAY_MS);
    const latestBefore = db.$client.prepare("select * from latest_values order by point_id").all();

    const pruner = track(db, startPruner({ db, clock, rawRetentionMs: 14 * DAY_MS, rollupRetentionMs: 730 * DAY_MS }));
    const removed = await pruner.runOnce();

    // 3 points × 2 old raw readings + point 3's one; 3 points × 2 old rollups, minutes and hours.
    expect(removed).toEqual({ readings: 7, rollups: 12 });
    for (const p of [1, 2, 207]) {
      expect(rawTs(db, p)).toEqual(rawKept);
      expect(rollupBuckets(db, p)).toEqual(rollKept);
    }
    expect(rawTs(db, 3)).toEqual([]);
    expect(count(db, "readings")).toBe(3 * rawKept.length);
    expect(count(db, "readings_1m")).toBe(3 * rollKept.length);
    expect(count(db, "readings_1h")).toBe(3 * rollKept.length);
    expect(db.$client.prepare("select * from latest_values order by point_id").all()).toEqual(latestBefore);

    // A second pass finds nothing more to do.
    expect(await pruner.runOnce()).toEqual({ readings: 0, rollups: 0 });
  });

  it("walks the rollup tables once a day, raw readings at every pass", async () => {
    const db = setup();
    const t = { now: NOW };
    const pruner = track(
      db,
      startPruner({
        db,
        clock: { now: () => t.now },
        rawRetentionMs: 14 * DAY_MS,
        rollupRetentionMs: 730 * DAY_MS,
        firstRunMs: 3_600_000,
      }),
    );
    expect(await pruner.runOnce()).toEqual({ readings: 0, rollups: 0 });
    // An hour later a rollup and a raw reading are past retention: only the reading goes.
    t.now = NOW + 3_600_000;
    insertRaw(db, [[1, t.now - 15 * DAY_MS]]);
    insertRollups(db, [[1, t.now - 731 * DAY_MS]]);
    expect(await pruner.runOnce()).toEqual({ readings: 1, rollups: 0 });
    // A day after the first pass the rollup tables are walked again.
    t.now = NOW + 24 * 3_600_000;
    expect(await pruner.runOnce()).toEqual({ readings: 0, rollups: 2 });
  });

  it("honours configured retentions and starts its passes on its own", async () => {
    const db = setup();
    // RAW_RETENTION_DAYS=3, ROLLUP_RETENTION_DAYS=30
    insertRaw(db, [
      [5, NOW - 3 * DAY_MS - 1],
      [5, NOW - 3 * DAY_MS],
      [5, NOW - 2 * DAY_MS],
    ]);
    insertRollups(db, [
      [5, NOW - 31 * DAY_MS],
      [5, NOW - 30 * DAY_MS],
      [5, NOW - 10 * DAY_MS],
    ]);
    const lines: string[] = [];
    track(
      db,
      startPruner({
        db,
        clock,
        rawRetentionMs: 3 * DAY_MS,
        rollupRetentionMs: 30 * DAY_MS,
        firstRunMs: 10,
        everyMs: 60_000,
        log: (l) => lines.push(l),
      }),
    );
    const until = performance.now() + 5000;
    // The pass logs once it has walked every point.
    while (lines.length === 0 && performance.now() < until) await new Promise((r) => setTimeout(r, 10));
    expect(rawTs(db, 5)).toEqual([NOW - 3 * DAY_MS, NOW - 2 * DAY_MS]);
    expect(rollupBuckets(db, 5)).toEqual([NOW - 30 * DAY_MS, NOW - 10 * DAY_MS]);
    expect(lines).toEqual(["[prune] removed 1 raw readings and 2 rollups past retention"]);
  });

  it("prunes a 200k-row backlog in short slices while ingestion goes on", async () => {
    const db = setup();
    const rawBefore = NOW - 14 * DAY_MS;
    // 50 points × 4,000 readings at 1 s past retention (more than one 2,000-row chunk per
    // point), and 50 × 100 recent readings that must stay.
    // Generated in SQL, so no 200k-element array is left for the garbage collector mid-pass.
    db.$client
      .prepare(
        `with recursive n(i) as (select 0 union all select i + 1 from n where i < 3999)
         insert into readings (point_id, ts, value, text, quality) select p.id, ? - 1 - n.i * 1000, n.i % 97, null, 0 from points p, n where p.id <= 50`,
      )
      .run(rawBefore);
    const recent: Array<[number, number]> = [];
    for (let p = 1; p <= 50; p++) for (let i = 0; i < 100; i++) recent.push([p, NOW - i * 1000]);
    insertRaw(db, recent);
    expect(count(db, "readings")).toBe(205_000);

    db.insert(gateways)
      .values({
        id: "gw-prune",
        siteId: "harborview-mob",
        name: "prune",
        protocol: "json",
        username: "gw-prune",
        passwordHash: "-",
      })
      .run();
    // Inline: the writer shares its thread with the pruner, as the store worker does in the server.
    const writer = createBatchWriter({ db, flushMs: 5, checkpointMs: 0, thread: "inline" });
    const pruner = track(db, startPruner({ db, clock, rawRetentionMs: 14 * DAY_MS, rollupRetentionMs: 730 * DAY_MS }));

    // Readings keep arriving (point 100, every 5 ms) during the pass; each must commit soon.
    const commitMs: number[] = [];
    let writing = true;
    const ingest = (async () => {
      for (let i = 0; writing; i++) {
        const t0 = performance.now();
        await writer.submit({
          gatewayId: "gw-prune",
          messages: 1,
          receivedAtMs: NOW,
          rows: [{ pointId: 100, siteId: "harborview-mob", ts: NOW - i, value: i, text: null, quality: 0, live: i }],
        });
        commitMs.push(performance.now() - t0);
        await new Promise((r) => setTimeout(r, 5));
      }
    })();
    const passStarted = performance.now();
    const { result, gaps, turns } = await loopGaps(() => pruner.runOnce());
    const passMs = performance.now() - passStarted;
    writing = false;
    await ingest;
    await writer.close();

    expect(result).toEqual({ readings: 200_000, rollups: 0 });
    expect(count(db, "readings")).toBe(100 * 50 + commitMs.length);
    for (const p of [1, 25, 50])
      expect(rawTs(db, p)).toEqual(
        recent
          .filter(([q]) => q === p)
          .map(([, ts]) => ts)
          .sort((a, b) => a - b),
      );
    // Slices are ~5 ms of work (pruner.ts SLICE_MS) plus one 2,000-row delete: measured p90
    // 6.5–7.8 ms, longest 8.6–18.2 ms in 4 runs of the whole unit suite (the longest includes a
    // writer flush landing in the same timers phase). Beside other test files on 2 cores one stretch can be descheduled, hence a
    // percentile for "a few ms" and a looser bound on the single longest. Run in one go the pass
    // is one stretch of 265–276 ms (measured here), so an unsliced pruner fails both.
    const sorted = [...gaps].sort((a, b) => a - b);
    const p90 = sorted[Math.floor(sorted.length * 0.9)];
    const longest = sorted[sorted.length - 1];
    const seen = `${gaps.length} stretches of work during a ${passMs.toFixed(0)} ms pass, p90 ${p90.toFixed(1)} ms, longest ${longest.toFixed(1)} ms`;
    expect(passMs, "the backlog takes several slices").toBeGreaterThan(60);
    expect(gaps.length, seen).toBeGreaterThan(10);
    expect(p90, seen).toBeLessThan(15);
    expect(longest, seen).toBeLessThan(100);
    expect(turns).toBeGreaterThan(10);
    // Ingestion committed during the pass, none of it held back for more than a few slices.
    expect(commitMs.length).toBeGreaterThan(5);
    expect(Math.max(...commitMs)).toBeLessThan(60);
  }, 60_000);
});
