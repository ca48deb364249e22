import "server-only";
import type Database from "better-sqlite3";
import { and, asc, eq, gte, inArray, lt, sql } from "drizzle-orm";
import type { Db } from "../client";
import { equipment, gatewayPointMaps, gateways, latestValues, points, readings, sites } from "../schema";
import { canSeeSite } from "./sites";
import { listGatewayPresence } from "./gateways";
import type { Viewer } from "@/lib/auth/viewer";
import { notFound } from "@/lib/errors";
import { quantities, type Measure, type QuantityKey } from "@/lib/quantities";
import { displayUnit, formatValue, fromCanonical } from "@/lib/units";
import { freshnessByGateway, isStale, siteStatuses, type MappedPoint, type SiteStatusRow } from "@/lib/freshness";
import { HOUR_MS, MINUTE_MS } from "@/lib/rollup-buckets";
import type { LatestPointDto, SeriesDto, SiteLatestDto } from "@/lib/dto/readings";
import { qualityNames } from "@/lib/quality";

// Reading data for screens: trends (raw or 1-minute rollups, bucketed with min/max so spikes
// stay visible) and the latest value of every point with its age. Viewer-scoped.

export interface SeriesQuery {
  fromMs: number;
  toMs: number;
  maxPoints: number;
}

interface PointInfo {
  pointId: number;
  siteId: string;
  quantity: string;
  measure: Measure;
}

function pointInfo(db: Db, viewer: Viewer, pointId: number): PointInfo {
  const row = db
    .select({ pointId: points.id, siteId: equipment.siteId, quantity: points.quantity })
    .from(points)
    .innerJoin(equipment, eq(equipment.id, points.equipmentId))
    .where(eq(points.id, pointId))
    .get();
  // A point of a site the viewer may not see does not exist for them.
  if (!row || !canSeeSite(db, viewer, row.siteId)) throw notFound("No such point.");
  const q = quantities[row.quantity as QuantityKey];
  return { ...row, measure: q?.measure ?? "text" };
}

export function getSeries(
  db: Db,
  viewer: Viewer,
  pointId: number,
  q: SeriesQuery,
  opts: { nowMs: number; rawRetentionMs: number },
): SeriesDto {
  const p = pointInfo(db, viewer, pointId);
  const system = viewer.unitSystem;
  const span = Math.max(1, q.toMs - q.fromMs);
  const base = {
    pointId,
    quantity: p.quantity,
    measure: p.measure,
    unit: displayUnit(p.measure, system),
    unitSystem: system,
    from: new Date(q.fromMs).toISOString(),
    to: new Date(q.toMs).toISOString(),
  };
  // Three decimals of the display unit, finer than any of these points is read to, so full
  // doubles do not bloat the response and its compression.
  const conv = (v: number) => Math.round(fromCanonical(v, p.measure, system) * 1000) / 1000;
  const inRange = and(eq(readings.pointId, pointId), gte(readings.ts, q.fromMs), lt(readings.ts, q.toMs));

  if (p.measure === "state" || p.measure === "text") {
    const rows = db
      .select({ ts: readings.ts, text: readings.text })
      .from(readings)
      .where(inRange)
      .orderBy(sql`${readings.ts} desc`)
      .limit(q.maxPoints)
      .all()
      .reverse();
    return {
      ...base,
      source: "raw",
      bucketMs: null,
      time: rows.map((r) => r.ts),
      min: [],
      max: [],
      avg: [],
      count: [],
      text: rows.map((r) => r.text ?? ""),
    };
  }

  const rawWidth = Math.ceil(span / q.maxPoints);
  const useRollups = rawWidth >= MINUTE_MS || q.fromMs < opts.nowMs - opts.rawRetentionMs;

  if (!useRollups) {
    const n =
      db
        .select({ n: sql<number>`count(*)` })
        .from(readings)
        .where(inRange)
        .get()?.n ?? 0;
    if (n <= q.maxPoints) {
      const rows = db
        .select({ ts: readings.ts, value: readings.value })
        .from(readings)
        .where(and(inRange, sql`${readings.value} is not null`))
        .orderBy(asc(readings.ts))
        .all();
      const v = rows.map((r) => conv(r.value!));
      return {
        ...base,
        source: "raw",
        bucketMs: null,
        time: rows.map((r) => r.ts),
        min: v,
        max: v,
        avg: v,
        count: rows.map(() => 1),
      };
    }
    const w = Math.trunc(rawWidth);
    const rows = db
      .select({
        // Inlined: a bound JS number arrives as REAL and the division would not floor.
        t: sql<number>`(${readings.ts} / ${sql.raw(String(w))}) * ${sql.raw(String(w))}`,
        min: sql<number>`min(${readings.value})`,
        max: sql<number>`max(${readings.value})`,
        avg: sql<number>`avg(${readings.value})`,
        count: sql<number>`count(${readings.value})`,
      })
      .from(readings)
      .where(and(inRange, sql`${readings.value} is not null`))
      .groupBy(sql`1`)
      .orderBy(sql`1`)
      .all();
    return columnar(base, "raw", w, rows, conv);
  }

  // A range of many hours reads hourly rollups (a sixtieth of the rows of minutes) as long as
  // that still gives at least half the buckets asked for.
  const tier = Math.ceil(span / HOUR_MS) * 2 >= q.maxPoints ? HOUR_MS : MINUTE_MS;
  // Buckets are whole minutes (or hours), so the width is too.
  const w = Math.max(tier, Math.ceil(rawWidth / tier) * tier);
  const rows = rollupBuckets(db.$client, pointId, Math.floor(q.fromMs / tier) * tier, q.toMs, w, tier);
  return columnar(
    base,
    tier === HOUR_MS ? "rollup_1h" : "rollup_1m",
    w,
    rows.map((r) => ({ t: r.t, min: r.min, max: r.max, avg: r.sum / r.count, count: r.count })),
    conv,
  );
}

type Bucket = { t: number; min: number; max: number; sum: number; count: number };

// Statements prepared once per connection: a trend request runs three of them.
const bucketStatements = new WeakMap<Database.Database, ReturnType<typeof prepareBucketStatements>>();
function prepareBucketStatements(sqlite: Database.Database) {
  // The width is cast: a bound JS number arrives as REAL and the division would not floor.
  const rollup = (table: string) =>
    sqlite.prepare<{ p: number; from: number; to: number; w: number }, Bucket>(
      `select (bucket / cast(@w as integer)) * cast(@w as integer) as t, min(min) as min, max(max) as max, sum(sum) as sum, sum(count) as count
       from ${table} where point_id = @p and bucket >= @from and bucket < @to group by 1 order by 1`,
    );
  return {
    watermark: sqlite.prepare<[], number>("select value from ingest_state where key = 'rollups_sealed_before'").pluck(),
    hours: rollup("readings_1h"),
    minutes: rollup("readings_1m"),
    raw: sqlite.prepare<{ p: number; from: number; to: number; w: number }, Bucket>(
      `select (ts / cast(@w as integer)) * cast(@w as integer) as t, min(value) as min, max(value) as max, sum(value) as sum, count(value) as count
       from readings where point_id = @p and ts >= @from and ts < @to and value is not null group by 1 order by 1`,
    ),
  };
}

/**
 * A point's buckets of width `w` over [fromMs, toMs) from rollups, in one read transaction so
 * the watermark and the rows are one snapshot. readings_1m holds every minute before the
 * watermark; hours are complete up to the hour the watermark is in; from the watermark on
 * (minutes still open in the ingest writer, or part-way written) the buckets are aggregated
 * from raw readings, a few minutes of one point, rather than asking the store worker for its
 * open minutes, which would wait behind whatever flush it is committing.
 */
function rollupBuckets(
  sqlite: Database.Database,
  pointId: number,
  fromMs: number,
  toMs: number,
  w: number,
  tier: number,
): Bucket[] {
  let st = bucketStatements.get(sqlite);
  if (!st) bucketStatements.set(sqlite, (st = prepareBucketStatements(sqlite)));
  const s = st;
  return sqlite.transaction(() => {
    const sealedBefore = s.watermark.get() ?? Infinity;
    // Where each source ends: hours up to the watermark's hour, minutes up to the watermark.
    const hoursEnd = tier === HOUR_MS ? Math.min(toMs, Math.floor(sealedBefore / HOUR_MS) * HOUR_MS) : fromMs;
    const minutesEnd = Math.min(toMs, sealedBefore);
    let out = hoursEnd > fromMs ? s.hours.all({ p: pointId, from: fromMs, to: hoursEnd, w }) : [];
    const minutesFrom = Math.max(fromMs, hoursEnd);
    if (minutesEnd > minutesFrom)
      out = mergeBuckets(out, s.minutes.all({ p: pointId, from: minutesFrom, to: minutesEnd, w }));
    const rawFrom = Math.max(fromMs, sealedBefore);
    if (toMs > rawFrom) out = mergeBuckets(out, s.raw.all({ p: pointId, from: rawFrom, to: toMs, w }));
    return out;
  })();
}

/** Two bucket lists of one width, each sorted by time and from adjacent ranges, as one series. */
function mergeBuckets(a: Bucket[], b: Bucket[]): Bucket[] {
  if (a.length === 0) return b;
  if (b.length === 0) return a;
  const out: Bucket[] = [];
  let i = 0;
  let j = 0;
  while (i < a.length || j < b.length) {
    const x = a[i];
    const y = b[j];
    if (y === undefined || (x !== undefined && x.t < y.t)) out.push(a[i++]);
    else if (x === undefined || y.t < x.t) out.push(b[j++]);
    else {
      // The bucket where one source ends and the next begins holds rows of both.
      out.push({
        t: x.t,
        min: Math.min(x.min, y.min),
        max: Math.max(x.max, y.max),
        sum: x.sum + y.sum,
        count: x.count + y.count,
      });
      i++;
      j++;
    }
  }
  return out;
}

function columnar(
  base: Omit<SeriesDto, "source" | "bucketMs" | "time" | "min" | "max" | "avg" | "count">,
  source: SeriesDto["source"],
  width: number,
  rows: Array<{ t: number; min: number; max: number; avg: number; count: number }>,
  conv: (v: number) => number,
): SeriesDto {
  return {
    ...base,
    source,
    bucketMs: width,
    time: rows.map((r) => r.t),
    min: rows.map((r) => conv(r.min)),
    max: rows.map((r) => conv(r.max)),
    avg: rows.map((r) => conv(r.avg)),
    count: rows.map((r) => r.count),
  };
}

function liveValue(measure: Measure, value: number | null, text: string | null): number | boolean | string | null {
  if (measure === "boolean") return value === null ? null : value !== 0;
  if (measure === "state" || measure === "text") return text;
  return value;
}

/** A point's newest committed value held in memory by the running server (latest_values lags it). */
export type LatestInMemory = (
  pointId: number,
) => { tsMs: number; value: number | boolean | string; quality: "good" | "uncertain" | "bad" } | undefined;

export function getSiteLatest(
  db: Db,
  viewer: Viewer,
  siteId: string,
  nowMs: number,
  inMemory?: LatestInMemory,
): SiteLatestDto {
  if (!canSeeSite(db, viewer, siteId)) throw notFound("No such site.");
  const rows = db
    .select({
      pointId: points.id,
      equipmentId: equipment.id,
      equipmentTag: equipment.tag,
      key: points.key,
      quantity: points.quantity,
      unit: points.unit,
      expectedIntervalS: points.expectedIntervalS,
      ts: latestValues.ts,
      value: latestValues.value,
      text: latestValues.text,
      quality: latestValues.quality,
      mapped: sql<number>`exists (select 1 from ${gatewayPointMaps} m join ${gateways} g on g.id = m.gateway_id where m.point_id = ${points.id} and g.revoked_at is null)`,
    })
    .from(points)
    .innerJoin(equipment, eq(equipment.id, points.equipmentId))
    .leftJoin(latestValues, eq(latestValues.pointId, points.id))
    .where(eq(equipment.siteId, siteId))
    .orderBy(asc(equipment.tag), asc(points.id))
    .all();
  const out: LatestPointDto[] = rows.map((stored) => {
    const measure = quantities[stored.quantity as QuantityKey]?.measure ?? "text";
    const mem = inMemory?.(stored.pointId);
    const newer = mem !== undefined && (stored.ts === null || mem.tsMs >= stored.ts);
    const r = newer ? { ...stored, ts: mem.tsMs, quality: qualityNames.indexOf(mem.quality) } : stored;
    const value = newer ? mem.value : r.ts === null ? null : liveValue(measure, r.value, r.text);
    return {
      pointId: r.pointId,
      equipmentId: r.equipmentId,
      equipmentTag: r.equipmentTag,
      key: r.key,
      quantity: r.quantity,
      measure,
      unit: r.unit,
      value,
      display: formatValue(value, measure, viewer.unitSystem),
      ts: r.ts === null ? null : new Date(r.ts).toISOString(),
      tsMs: r.ts,
      ageS: r.ts === null ? null : Math.max(0, Math.round((nowMs - r.ts) / 1000)),
      stale: r.ts === null || isStale(r.ts, r.expectedIntervalS, nowMs),
      quality: r.quality === null ? null : (qualityNames[r.quality] ?? "bad"),
      expectedIntervalS: r.expectedIntervalS,
      mapped: r.mapped === 1,
    };
  });
  const status = siteDataStatus(db, nowMs, siteId);
  const gws = db
    .select({ id: gateways.id, name: gateways.name, protocol: gateways.protocol, revokedAt: gateways.revokedAt })
    .from(gateways)
    .where(eq(gateways.siteId, siteId))
    .all()
    .filter((g) => g.revokedAt === null);
  return {
    siteId,
    at: new Date(nowMs).toISOString(),
    data: status?.data ?? "no_gateway",
    gateways: gws.map((g) => {
      const p = status?.gateways.get(g.id);
      return {
        id: g.id,
        name: g.name,
        protocol: g.protocol,
        online: p?.online ?? false,
        lastMessageAt: p?.lastMessageAtMs ? new Date(p.lastMessageAtMs).toISOString() : null,
      };
    }),
    points: out,
  };
}

/** Points mapped through each gateway, grouped by gateway, with the event time of their newest stored reading. */
export function mappedPoints(db: Db, onlySiteId?: string): Array<MappedPoint & { ts: number | null }> {
  return db
    .select({
      gatewayId: gatewayPointMaps.gatewayId,
      pointId: gatewayPointMaps.pointId,
      expectedIntervalS: points.expectedIntervalS,
      ts: latestValues.ts,
    })
    .from(gatewayPointMaps)
    .innerJoin(gateways, eq(gateways.id, gatewayPointMaps.gatewayId))
    .innerJoin(points, eq(points.id, gatewayPointMaps.pointId))
    .leftJoin(latestValues, eq(latestValues.pointId, gatewayPointMaps.pointId))
    .where(onlySiteId ? eq(gateways.siteId, onlySiteId) : undefined)
    .orderBy(gatewayPointMaps.gatewayId)
    .all();
}

export function allSiteIds(db: Db): string[] {
  return db
    .select({ id: sites.id })
    .from(sites)
    .all()
    .map((s) => s.id);
}

/**
 * A site's data status from stored latest values, for the latest-values API. The running
 * server's live publisher answers the same for every site from memory (lib/server/realtime/live.ts).
 */
export function siteDataStatus(db: Db, nowMs: number, siteId: string): SiteStatusRow | undefined {
  const mapped = mappedPoints(db, siteId);
  const ts = new Map(mapped.map((m) => [m.pointId, m.ts]));
  return siteStatuses({
    siteIds: [siteId],
    presence: listGatewayPresence(db),
    freshness: freshnessByGateway(mapped, (id) => ts.get(id), nowMs),
    nowMs,
  }).get(siteId);
}

/** Every point's stored latest value as screens get it (booleans as booleans), to seed the live publisher. */
export function storedLatestValues(
  db: Db,
): Array<{ pointId: number; tsMs: number; value: number | boolean | string; quality: (typeof qualityNames)[number] }> {
  const rows = db
    .select({
      pointId: latestValues.pointId,
      ts: latestValues.ts,
      value: latestValues.value,
      text: latestValues.text,
      quality: latestValues.quality,
      quantity: points.quantity,
    })
    .from(latestValues)
    .innerJoin(points, eq(points.id, latestValues.pointId))
    .all();
  const out = [];
  for (const r of rows) {
    const value = liveValue(quantities[r.quantity as QuantityKey]?.measure ?? "text", r.value, r.text);
    if (value !== null) out.push({ pointId: r.pointId, tsMs: r.ts, value, quality: qualityNames[r.quality] ?? "bad" });
  }
  return out;
}

/** All point ids, for the pruner to walk one primary-key range at a time. */
export function allPointIds(db: Db): number[] {
  return db
    .select({ id: points.id })
    .from(points)
    .orderBy(asc(points.id))
    .all()
    .map((p) => p.id);
}

/** Every point's equipment tag and quantity: how the rule checks name a reading. */
export function pointRuleNames(db: Db): Array<{ pointId: number; tag: string; quantity: string }> {
  return db
    .select({ pointId: points.id, tag: equipment.tag, quantity: points.quantity })
    .from(points)
    .innerJoin(equipment, eq(equipment.id, points.equipmentId))
    .all();
}

/** One point's equipment tag and quantity, with the statement prepared once (points added later). */
export function pointRuleNameLookup(db: Db): (pointId: number) => { tag: string; quantity: string } | undefined {
  const statement = db
    .select({ tag: equipment.tag, quantity: points.quantity })
    .from(points)
    .innerJoin(equipment, eq(equipment.id, points.equipmentId))
    .where(eq(points.id, sql.placeholder("pointId")))
    .prepare();
  return (pointId) => statement.get({ pointId });
}

/**
 * Each point's reading at `atMs` (the newest at or before it, no older than `withinMs`), as screens
 * get values (booleans as booleans); points of sites the viewer may not see are left out.
 */
export function valuesAt(
  db: Db,
  viewer: Viewer,
  pointIds: readonly number[],
  atMs: number,
  withinMs = 15 * MINUTE_MS,
): Map<number, { tsMs: number; value: number | boolean | string }> {
  const out = new Map<number, { tsMs: number; value: number | boolean | string }>();
  if (!pointIds.length) return out;
  const found = db
    .select({ pointId: points.id, siteId: equipment.siteId, quantity: points.quantity })
    .from(points)
    .innerJoin(equipment, eq(equipment.id, points.equipmentId))
    .where(inArray(points.id, [...pointIds]))
    .all();
  const visible = new Map<string, boolean>();
  for (const p of found) {
    if (!visible.has(p.siteId)) visible.set(p.siteId, canSeeSite(db, viewer, p.siteId));
    if (!visible.get(p.siteId)) continue;
    // The primary key (point_id, ts) makes this one index step back from `atMs`.
    const row = db
      .select({ ts: readings.ts, value: readings.value, text: readings.text })
      .from(readings)
      .where(and(eq(readings.pointId, p.pointId), lt(readings.ts, atMs + 1), gte(readings.ts, atMs - withinMs)))
      .orderBy(sql`${readings.ts} desc`)
      .limit(1)
      .get();
    if (!row) continue;
    const value = liveValue(quantities[p.quantity as QuantityKey]?.measure ?? "text", row.value, row.text);
    if (value !== null) out.set(p.pointId, { tsMs: row.ts, value });
  }
  return out;
}
