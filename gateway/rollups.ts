import type Database from "better-sqlite3";
import { bucketOf, hourOf, HOUR_MS, MINUTE_MS } from "@/lib/rollup-buckets";
import { ingestState } from "./ingest-state";

// 1-minute rollups (min/max/sum/count/last) kept in memory while their minute is open and
// written to `readings_1m` once, when it has closed ("sealed"), so a point costs one rollup row
// write a minute however often it reports.
//
// Durability rests on raw readings, which are committed before any PUBACK: the watermark
// `rollups_sealed_before` (ingest_state) is advanced in the same transaction that writes the
// sealed minutes, and every stored reading of a minute before it is in `readings_1m`. After a
// crash, `recover()` drops rollup rows at or after the watermark and rebuilds those minutes from
// raw readings, so nothing is lost and nothing is counted twice. A reading that arrives for a
// minute already sealed is merged into its row by the same upsert.
//
// Every minute written is also added to its hour in `readings_1h` (same transaction), so long
// trends read hours. An hour is complete once the watermark has passed its end; the hour the
// watermark is in may hold part of a minute written just before a crash, so recovery rebuilds
// it from its stored minutes.

const WATERMARK = "rollups_sealed_before" as const;

export interface MinuteAggregate {
  pointId: number;
  bucket: number;
  min: number;
  max: number;
  sum: number;
  count: number;
  last: number;
  lastTs: number;
}

export interface RollupBook {
  /** The seal limit at `nowMs`: minutes before it are written at this flush. */
  limit(nowMs: number): number;
  /** A limit past every open minute, for a clean stop. */
  limitAll(nowMs: number): number;
  /**
   * Inside the flush's transaction: writes up to `budget` aggregates of the open minutes before
   * `limit`, oldest minute first, and the watermark up to the first minute not yet fully written.
   * A portfolio closes all its point-minutes at once; the budget keeps them from holding the
   * writer (and so every PUBACK) in one long transaction.
   */
  writeSealed(limit: number, budget?: number): SealProgress;
  /** Inside the flush's transaction: a reading of a minute before the limit goes straight to its row. */
  writeLate(pointId: number, ts: number, value: number): void;
  /** After that transaction committed: drops fully written minutes from memory, advances the watermark. */
  markSealed(progress: SealProgress): void;
  /** After a commit: a reading of a minute at or after the limit joins its open minute. */
  add(pointId: number, ts: number, value: number): void;
  /** Whether a flush at `nowMs` would write anything. */
  sealDue(nowMs: number): boolean;
  /** Drops the open minutes of these points (their stored history was replaced). */
  forget(pointIds: readonly number[]): void;
  /** Rebuilds the open minutes from raw readings after an unclean stop. Returns readings replayed. */
  recover(pointIds: readonly number[]): number;
  /** Open (point, minute) aggregates held. */
  size(): number;
}

/** What a writeSealed wrote: how far into each minute, and the watermark that follows. */
export interface SealProgress {
  written: Array<[bucket: number, upTo: number]>;
  sealedBefore: number;
}

// SQLite evaluates every SET expression against the old row, so `last` compares old last_ts.
const upsertSql = (table: "readings_1m" | "readings_1h") =>
  `insert into ${table} (point_id, bucket, min, max, sum, count, last, last_ts) values (?, ?, ?, ?, ?, ?, ?, ?)
   on conflict (point_id, bucket) do update set
     min = min(${table}.min, excluded.min),
     max = max(${table}.max, excluded.max),
     sum = ${table}.sum + excluded.sum,
     count = ${table}.count + excluded.count,
     last = case when excluded.last_ts >= ${table}.last_ts then excluded.last else ${table}.last end,
     last_ts = max(${table}.last_ts, excluded.last_ts)`;

/**
 * Rewrites a point's hours from the one holding `fromMs` on out of its stored minutes, after
 * minutes from `fromMs` on were dropped (crash recovery, a replaced simulated timeline). Run
 * inside the caller's transaction.
 */
export function hourRebuilder(sqlite: Database.Database): (pointId: number, fromMs: number) => void {
  const drop = sqlite.prepare("delete from readings_1h where point_id = ? and bucket >= ?");
  const refill = sqlite.prepare(
    `insert into readings_1h (point_id, bucket, min, max, sum, count, last, last_ts)
     select point_id, (bucket / ${HOUR_MS}) * ${HOUR_MS}, min(min), max(max), sum(sum), sum(count),
       (select l.last from readings_1m l where l.point_id = @p and l.bucket >= @hour and l.bucket < @hour + ${HOUR_MS} order by l.last_ts desc, l.bucket desc limit 1),
       max(last_ts)
     from readings_1m where point_id = @p and bucket >= @hour and bucket < @hour + ${HOUR_MS}
     group by 1, 2`,
  );
  return (pointId, fromMs) => {
    const hour = hourOf(fromMs);
    drop.run(pointId, hour);
    refill.run({ p: pointId, hour });
  };
}

export function createRollupBook(sqlite: Database.Database, opts: { graceMs: number; nowMs: number }): RollupBook {
  const { graceMs } = opts;
  // Keyed by minute, then point: sealing takes whole minutes, and at any time only a few are open.
  const open = new Map<number, Map<number, MinuteAggregate>>();
  // A closed minute being written over several flushes: its aggregates in a fixed order, and
  // how many are stored. It stays in `open` (so trends see all of it) until the last is stored.
  const sealing = new Map<number, { aggs: MinuteAggregate[]; stored: number }>();
  let lastBucket = NaN;
  let lastMinute: Map<number, MinuteAggregate> | undefined;

  const upsertMinute = sqlite.prepare(upsertSql("readings_1m"));
  const upsertHour = sqlite.prepare(upsertSql("readings_1h"));
  const upsert = (
    pointId: number,
    bucket: number,
    min: number,
    max: number,
    sum: number,
    count: number,
    last: number,
    lastTs: number,
  ) => {
    upsertMinute.run(pointId, bucket, min, max, sum, count, last, lastTs);
    upsertHour.run(pointId, hourOf(bucket), min, max, sum, count, last, lastTs);
  };
  const state = ingestState(sqlite);
  const stored = state.get(WATERMARK);
  // A new database, or one whose rollups were all written as readings arrived: nothing before
  // now is missing from readings_1m.
  let sealedBefore = stored ?? bucketOf(opts.nowMs - graceMs);
  if (stored === undefined) state.raise(WATERMARK, sealedBefore);

  // Minutes before the limit are written at the next flush: those closed graceMs ago, and any
  // before the watermark (the open minute after a clean stop sealed everything early).
  const limit = (nowMs: number) => Math.max(bucketOf(nowMs - graceMs), sealedBefore);

  function add(pointId: number, ts: number, value: number) {
    const bucket = bucketOf(ts);
    let minute = bucket === lastBucket ? lastMinute : open.get(bucket);
    if (!minute) open.set(bucket, (minute = new Map()));
    lastBucket = bucket;
    lastMinute = minute;
    const agg = minute.get(pointId);
    if (agg === undefined) {
      minute.set(pointId, { pointId, bucket, min: value, max: value, sum: value, count: 1, last: value, lastTs: ts });
      return;
    }
    if (value < agg.min) agg.min = value;
    if (value > agg.max) agg.max = value;
    agg.sum += value;
    agg.count++;
    if (ts >= agg.lastTs) {
      agg.last = value;
      agg.lastTs = ts;
    }
  }

  function recover(pointIds: readonly number[]): number {
    const from = sealedBefore;
    const drop = sqlite.prepare("delete from readings_1m where point_id = ? and bucket >= ?");
    const rebuildHours = hourRebuilder(sqlite);
    const raw = sqlite.prepare(
      "select ts, value from readings where point_id = ? and ts >= ? and value is not null order by ts",
    );
    let replayed = 0;
    sqlite.transaction(() => {
      for (const id of pointIds) {
        drop.run(id, from);
        rebuildHours(id, from);
        for (const r of raw.iterate(id, from) as IterableIterator<{ ts: number; value: number }>) {
          add(id, r.ts, r.value);
          replayed++;
        }
      }
    })();
    return replayed;
  }

  return {
    limit,
    limitAll(nowMs) {
      let before = limit(nowMs);
      for (const bucket of open.keys()) before = Math.max(before, bucket + MINUTE_MS);
      return before;
    },
    writeSealed(before, budget = Infinity) {
      const written: SealProgress["written"] = [];
      let watermark = before;
      let left = budget;
      for (const bucket of [...open.keys()].sort((a, b) => a - b)) {
        if (bucket >= before) break;
        let s = sealing.get(bucket);
        if (!s) sealing.set(bucket, (s = { aggs: [...open.get(bucket)!.values()], stored: 0 }));
        const upTo = Math.min(s.aggs.length, s.stored + left);
        for (let i = s.stored; i < upTo; i++) {
          const a = s.aggs[i];
          upsert(a.pointId, a.bucket, a.min, a.max, a.sum, a.count, a.last, a.lastTs);
        }
        left -= upTo - s.stored;
        written.push([bucket, upTo]);
        if (upTo < s.aggs.length) {
          watermark = bucket;
          break;
        }
      }
      if (watermark > sealedBefore) state.raise(WATERMARK, watermark);
      return { written, sealedBefore: Math.max(watermark, sealedBefore) };
    },
    writeLate(pointId, ts, value) {
      upsert(pointId, bucketOf(ts), value, value, value, 1, value, ts);
    },
    markSealed(progress) {
      for (const [bucket, upTo] of progress.written) {
        const s = sealing.get(bucket);
        if (!s) continue;
        s.stored = upTo;
        if (upTo >= s.aggs.length) {
          sealing.delete(bucket);
          open.delete(bucket);
          if (bucket === lastBucket) lastBucket = NaN;
        }
      }
      sealedBefore = progress.sealedBefore;
    },
    add,
    sealDue(nowMs) {
      const before = limit(nowMs);
      if (before > sealedBefore || sealing.size > 0) return true;
      for (const bucket of open.keys()) if (bucket < before) return true;
      return false;
    },
    forget(pointIds) {
      for (const minute of open.values()) for (const id of pointIds) minute.delete(id);
      // A minute part-way through being written goes on without the forgotten points' aggregates.
      const gone = new Set(pointIds);
      for (const s of sealing.values()) {
        s.aggs = [...s.aggs.slice(0, s.stored), ...s.aggs.slice(s.stored).filter((a) => !gone.has(a.pointId))];
      }
    },
    recover,
    size: () => {
      let n = 0;
      for (const minute of open.values()) n += minute.size;
      return n;
    },
  };
}
