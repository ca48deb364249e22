import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { max, min, sum } from "simple-statistics";
import { afterEach, describe, expect, it } from "vitest";
import { migrateDb, openDb, type Db } from "@/db/client";
import { getSeries } from "@/db/queries/readings";
import { gateways } from "@/db/schema";
import { SERVICE_ORG, seedDemo } from "@/db/seed/demo";
import type { MinuteAggregate } from "@/gateway/rollups";
import type { RowIn } from "@/gateway/row-columns";
import { createBatchWriter, type BatchWriter } from "@/gateway/writer";
import { systemViewer } from "@/lib/auth/viewer";

// Rollups written behind the readings, on a real migrated file database with a fake clock:
// a minute's row appears once the minute has closed, a late reading is merged into its sealed
// minute, trends count the open minutes from raw readings, and after an unclean stop (no close) the
// next writer rebuilds the open minutes from raw readings without losing or double-counting any.
// Reference: each minute's min/max/sum/count recomputed from the stored raw readings with the
// simple-statistics package (an implementation independent of the writer's).

const MINUTE_MS = 60_000;
const T0 = Date.UTC(2026, 11, 1, 14, 0, 0);
const POINTS = [1, 2, 3];

const dirs: string[] = [];
const dbs: Db[] = [];
afterEach(() => {
  for (const db of dbs.splice(0)) if (db.$client.open) db.$client.close();
  for (const d of dirs.splice(0)) fs.rmSync(d, { recursive: true, force: true });
});

function setup(): { file: string; db: Db } {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "liftline-rollups-"));
  dirs.push(dir);
  const file = path.join(dir, "liftline.db");
  const db = openDb(file);
  migrateDb(db);
  seedDemo(db, "unit-test-password");
  db.insert(gateways)
    .values({
      id: "gw-unit",
      siteId: "harborview-mob",
      name: "unit",
      protocol: "json",
      username: "gw-unit",
      passwordHash: "-",
    })
    .run();
  dbs.push(db);
  return { file, db };
}

function reopen(file: string): Db {
  const db = openDb(file);
  dbs.push(db);
  return db;
}

// A deterministic, irregular signal per point.
const valueAt = (pointId: number, ts: number) =>
  Math.round((40 + pointId + 3 * Math.sin(ts / 17_000 + pointId)) * 1000) / 1000;
const row = (pointId: number, ts: number, value = valueAt(pointId, ts)): RowIn => ({
  pointId,
  siteId: "harborview-mob",
  ts,
  value,
  text: null,
  quality: 0,
  live: value,
});

/** One reading per point every 5 s over [fromMs, toMs), each flushed at ts + 0.5 s. */
async function publish(w: BatchWriter, clock: { t: number }, fromMs: number, toMs: number) {
  for (let ts = fromMs; ts < toMs; ts += 5000) {
    clock.t = ts + 500;
    await w.submit({ gatewayId: "gw-unit", messages: 1, receivedAtMs: clock.t, rows: POINTS.map((p) => row(p, ts)) });
  }
}

/** A stored minute as the reference computes it (which reading was last is checked, not when). */
type MinuteRow = Omit<MinuteAggregate, "lastTs">;

function storedMinutes(db: Db): MinuteRow[] {
  return db.$client
    .prepare(
      "select point_id as pointId, bucket, min, max, sum, count, last from readings_1m order by point_id, bucket",
    )
    .all() as MinuteRow[];
}

/** The reference: every bucket of `widthMs` of every point from the raw rows, with simple-statistics. */
function expectedBuckets(db: Db, widthMs: number): MinuteRow[] {
  const raw = db.$client
    .prepare("select point_id as pointId, ts, value from readings where value is not null order by point_id, ts")
    .all() as Array<{ pointId: number; ts: number; value: number }>;
  const groups = new Map<string, { pointId: number; bucket: number; values: number[]; last: number }>();
  for (const r of raw) {
    const bucket = Math.floor(r.ts / widthMs) * widthMs;
    const key = `${r.pointId}:${bucket}`;
    const g = groups.get(key) ?? { pointId: r.pointId, bucket, values: [], last: r.value };
    g.values.push(r.value);
    g.last = r.value;
    groups.set(key, g);
  }
  return [...groups.values()].map((g) => ({
    pointId: g.pointId,
    bucket: g.bucket,
    min: min(g.values),
    max: max(g.values),
    sum: sum(g.values),
    count: g.values.length,
    last: g.last,
  }));
}
const expectedMinutes = (db: Db) => expectedBuckets(db, MINUTE_MS);

const roundSums = (rows: MinuteRow[]) => rows.map((r) => ({ ...r, sum: Math.round(r.sum * 1e6) / 1e6 }));

const HOUR_MS = 3_600_000;
function storedHours(db: Db): MinuteRow[] {
  return db.$client
    .prepare(
      "select point_id as pointId, bucket, min, max, sum, count, last from readings_1h order by point_id, bucket",
    )
    .all() as MinuteRow[];
}
const expectedHours = (db: Db) => expectedBuckets(db, HOUR_MS);

describe("rollups written behind the readings", () => {
  it.each(["worker", "inline"] as const)(
    "writes a minute once it has closed, merges a late reading into it, and shows open minutes to trends (%s)",
    async (thread) => {
      const { db } = setup();
      const clock = { t: T0 };
      const w = createBatchWriter({
        db,
        clock: { now: () => clock.t },
        flushMs: 1,
        checkpointMs: 0,
        rollupGraceMs: 10_000,
        thread,
      });
      await publish(w, clock, T0, T0 + 150_000);
      // now = 14:02:25.5: 14:00 and 14:01 have closed (+10 s grace), 14:02 is open.
      const buckets = [...new Set(storedMinutes(db).map((r) => r.bucket))];
      expect(buckets).toEqual([T0, T0 + MINUTE_MS]);
      expect(w.stats().openRollups).toBe(POINTS.length);

      // A reading 2 minutes late lands in its sealed minute in the same transaction.
      await w.submit({ gatewayId: "gw-unit", messages: 1, receivedAtMs: clock.t, rows: [row(1, T0 + 2_500)] });
      expect(storedMinutes(db).find((r) => r.pointId === 1 && r.bucket === T0)?.count).toBe(13);

      // A 30-minute trend counts the open minute's readings too, from raw readings (si viewer:
      // canonical units); its last bucket (14:00–14:03 at 3-minute width) is part sealed, part open.
      const viewer = { ...systemViewer(SERVICE_ORG.id), unitSystem: "si" as const };
      const series = getSeries(
        db,
        viewer,
        1,
        { fromMs: T0 - 27 * MINUTE_MS, toMs: T0 + 3 * MINUTE_MS, maxPoints: 10 },
        { nowMs: clock.t, rawRetentionMs: 14 * 86_400_000 },
      );
      expect(series.source).toBe("rollup_1m");
      expect(sum(series.count)).toBe(13 + 12 + 6);
      const rawValues = db.$client
        .prepare("select value from readings where point_id = 1 and ts >= ? and ts < ?")
        .pluck()
        .all(T0, T0 + 3 * MINUTE_MS) as number[];
      expect(series.min.at(-1)).toBe(min(rawValues));
      expect(series.max.at(-1)).toBe(max(rawValues));

      await w.close();
      expect(roundSums(storedMinutes(db))).toEqual(roundSums(expectedMinutes(db)));
      expect(roundSums(storedHours(db))).toEqual(roundSums(expectedHours(db)));
      expect(db.$client.prepare("select value from ingest_state where key = 'closed_cleanly'").pluck().get()).toBe(1);
    },
  );

  it("writes a closed minute a few aggregates per flush, and trends count it exactly once meanwhile", async () => {
    const { db } = setup();
    const clock = { t: T0 };
    const w = createBatchWriter({
      db,
      clock: { now: () => clock.t },
      flushMs: 1,
      checkpointMs: 0,
      derivedRowsPerFlush: 2,
      thread: "inline",
    });
    const viewer = { ...systemViewer(SERVICE_ORG.id), unitSystem: "si" as const };
    const trendCount = async () =>
      sum(
        getSeries(
          db,
          viewer,
          3,
          { fromMs: T0 - 27 * MINUTE_MS, toMs: T0 + 3 * MINUTE_MS, maxPoints: 10 },
          { nowMs: clock.t, rawRetentionMs: 14 * 86_400_000 },
        ).count,
      );
    const stored = () => db.$client.prepare("select count(*) from readings where point_id = 3").pluck().get() as number;
    await publish(w, clock, T0, T0 + 75_000);
    // 14:00 has closed; its 3 aggregates go out 2 per flush while readings keep coming.
    for (let ts = T0 + 75_000; ts < T0 + 90_000; ts += 5000) {
      expect(await trendCount()).toBe(stored());
      clock.t = ts + 500;
      await w.submit({ gatewayId: "gw-unit", messages: 1, receivedAtMs: clock.t, rows: [row(1, ts)] });
    }
    expect(await trendCount()).toBe(stored());
    expect(storedMinutes(db).filter((r) => r.bucket === T0).length).toBe(3);
    await w.close();
    expect(roundSums(storedMinutes(db))).toEqual(roundSums(expectedMinutes(db)));
  });

  it("adds every written minute to its hour; a 30-day trend reads hours and counts each stored reading once", async () => {
    const { db } = setup();
    const clock = { t: T0 };
    // Two aggregates a flush: minutes are written part by part while readings keep coming.
    const w = createBatchWriter({
      db,
      clock: { now: () => clock.t },
      flushMs: 1,
      checkpointMs: 0,
      derivedRowsPerFlush: 2,
      thread: "inline",
    });
    const viewer = { ...systemViewer(SERVICE_ORG.id), unitSystem: "si" as const };
    const month = () =>
      getSeries(
        db,
        viewer,
        2,
        { fromMs: clock.t - 30 * 86_400_000, toMs: clock.t + 1000, maxPoints: 1000 },
        { nowMs: clock.t, rawRetentionMs: 14 * 86_400_000 },
      );
    const stored = () => db.$client.prepare("select count(*) from readings where point_id = 2").pluck().get() as number;
    // 14:00 to 16:30, one reading per point every 30 s; the trend is checked as it goes.
    for (let ts = T0; ts < T0 + 150 * MINUTE_MS; ts += 30_000) {
      clock.t = ts + 500;
      await w.submit({ gatewayId: "gw-unit", messages: 1, receivedAtMs: clock.t, rows: POINTS.map((p) => row(p, ts)) });
      if ((ts / 30_000) % 7 === 0) {
        const s = month();
        expect(s.source).toBe("rollup_1h");
        expect(sum(s.count)).toBe(stored());
      }
    }
    const s = month();
    expect(s.bucketMs).toBe(HOUR_MS);
    expect(s.time).toEqual([T0, T0 + HOUR_MS, T0 + 2 * HOUR_MS]);
    expect(s.count).toEqual([120, 120, 60]);
    // Averages come rounded to 0.001 of the unit (the readings themselves have three decimals).
    for (const v of [...s.min, ...s.max, ...s.avg]) expect(Math.round(v * 1000) / 1000).toBe(v);
    const hourAvg = db.$client
      .prepare("select sum(value) / count(*) from readings where point_id = 2 and ts >= ? and ts < ?")
      .pluck()
      .get(T0, T0 + HOUR_MS) as number;
    expect(s.avg[0]).toBeCloseTo(hourAvg, 3);
    // Complete hours are stored; the one in progress is not yet whole.
    const hours = storedHours(db).filter((r) => r.pointId === 2);
    expect(hours.slice(0, 2).map((r) => r.count)).toEqual([120, 120]);
    await w.close();
    expect(roundSums(storedHours(db))).toEqual(roundSums(expectedHours(db)));
  });

  it("after an unclean stop part-way through writing a minute, rebuilds that hour instead of counting the minute twice", async () => {
    const { file, db } = setup();
    const clock = { t: T0 };
    const first = createBatchWriter({
      db,
      clock: { now: () => clock.t },
      flushMs: 1,
      checkpointMs: 0,
      derivedRowsPerFlush: 2,
      thread: "inline",
    });
    // 14:01 closes at 14:02:10; the flush then writes 2 of its 3 aggregates (and their hours).
    await publish(first, clock, T0, T0 + 135_000);
    expect(storedMinutes(db).filter((r) => r.bucket === T0 + MINUTE_MS)).toHaveLength(2);
    db.$client.close();

    const db2 = reopen(file);
    const second = createBatchWriter({
      db: db2,
      clock: { now: () => clock.t },
      flushMs: 1,
      checkpointMs: 0,
      thread: "inline",
    });
    await publish(second, clock, T0 + 135_000, T0 + 240_000);
    await second.close();
    expect(roundSums(storedMinutes(db2))).toEqual(roundSums(expectedMinutes(db2)));
    expect(roundSums(storedHours(db2))).toEqual(roundSums(expectedHours(db2)));
  });

  it("rebuilds open minutes and latest values from raw readings after an unclean stop, counting each reading once", async () => {
    const { file, db } = setup();
    const clock = { t: T0 };
    const logs: string[] = [];
    // On this thread, so closing its connection stops it dead, like a killed process.
    const first = createBatchWriter({
      db,
      clock: { now: () => clock.t },
      flushMs: 1,
      checkpointMs: 0,
      latestEveryMs: 60_000,
      thread: "inline",
    });
    await publish(first, clock, T0, T0 + 150_000);
    expect(first.stats().openRollups).toBe(POINTS.length);
    expect(first.stats().unwrittenLatest).toBe(POINTS.length);
    // The process dies: no close(), so the open minute and the unwritten latest values are gone.
    db.$client.close();

    const db2 = reopen(file);
    const second = createBatchWriter({
      db: db2,
      clock: { now: () => clock.t },
      flushMs: 1,
      checkpointMs: 0,
      log: (l) => logs.push(l),
    });
    await publish(second, clock, T0 + 150_000, T0 + 240_000);
    // The worker's start-up log came before its first flush was acknowledged.
    expect(logs.join("\n")).toMatch(
      /recovered from an unclean stop: 18 readings of open rollup minutes, 3 latest values/,
    );
    await second.close();

    expect(roundSums(storedMinutes(db2))).toEqual(roundSums(expectedMinutes(db2)));
    expect(roundSums(storedHours(db2))).toEqual(roundSums(expectedHours(db2)));
    expect(
      storedMinutes(db2)
        .filter((r) => r.pointId === 1)
        .map((r) => r.count),
    ).toEqual([12, 12, 12, 12]);
    const latest = db2.$client
      .prepare("select point_id as p, ts from latest_values where point_id in (1, 2, 3) order by point_id")
      .all();
    expect(latest).toEqual(POINTS.map((p) => ({ p, ts: T0 + 235_000 })));

    // After a clean stop the next start has nothing to rebuild.
    const logs3: string[] = [];
    const third = createBatchWriter({
      db: db2,
      clock: { now: () => clock.t },
      flushMs: 1,
      checkpointMs: 0,
      log: (l) => logs3.push(l),
    });
    expect(logs3).toEqual([]);
    expect(third.stats().openRollups).toBe(0);
    await third.close();
  });
});
