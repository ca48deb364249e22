import { eq, sql } from "drizzle-orm";
import type { Db } from "@/db/client";
import { gatewayRejections, gateways, gatewayUnmappedPoints, latestValues, readings, readings1m } from "@/db/schema";
import type { RejectionReason } from "./contract";

// The batched writer: everything the ingest accepted (readings, counters, rejections) is
// queued and written in one transaction per flush through prepared statements. A submit
// resolves only after its transaction committed, which is what lets the broker hold the
// QoS 1 PUBACK until then (MQTT 3.1.1 §4.3.2: the receiver owns the message once it acks).

export interface Clock {
  now(): number;
}
export const systemClock: Clock = { now: () => Date.now() };

export type LiveValue = number | boolean | string;

export interface RowIn {
  pointId: number;
  siteId: string;
  ts: number;
  /** Numbers and booleans (0/1) */
  value: number | null;
  /** State and text points */
  text: string | null;
  quality: 0 | 1 | 2;
  /** The value as screens get it (canonical units, booleans as booleans). */
  live: LiveValue;
}

export interface Batch {
  gatewayId: string;
  rows: RowIn[];
  /** Messages this batch stands for (1 for a message, 0 for a counter-only update). */
  messages: number;
  rejections?: Partial<Record<RejectionReason, number>>;
  unmapped?: Map<string, number>;
  receivedAtMs: number;
}

export interface SubmitResult {
  accepted: number;
  duplicates: number;
}

export interface WriterOptions {
  db: Db;
  clock?: Clock;
  /** Longest a row waits before its flush starts. */
  flushMs?: number;
  /** A flush starts at once when this many rows are queued. */
  maxRows?: number;
  /** Called after each commit with the rows that were new (duplicates left out). */
  onCommitted?: (inserted: Array<RowIn & { gatewayId: string }>) => void;
  log?: (line: string) => void;
}

export interface BatchWriter {
  submit(batch: Batch): Promise<SubmitResult>;
  /** Writes everything queued now (synchronously). */
  flush(): void;
  close(): Promise<void>;
  stats(): { flushes: number; rows: number; queued: number; lastFlushMs: number; maxFlushMs: number };
}

interface Pending {
  batch: Batch;
  resolve: (r: SubmitResult) => void;
  reject: (err: unknown) => void;
}

const MINUTE_MS = 60_000;

export function createBatchWriter(opts: WriterOptions): BatchWriter {
  const { db } = opts;
  const flushMs = opts.flushMs ?? 50;
  const maxRows = opts.maxRows ?? 5000;
  const log = opts.log ?? (() => {});
  const ph = sql.placeholder;

  // Prepared once; Drizzle's prepared statements with placeholders stay close to raw speed.
  const insertReading = db
    .insert(readings)
    .values({ pointId: ph("pointId"), ts: ph("ts"), value: ph("value"), text: ph("text"), quality: ph("quality") })
    .onConflictDoNothing() // idempotent on (point_id, ts): a redelivered message adds nothing
    .prepare();
  const upsertRollup = db
    .insert(readings1m)
    .values({ pointId: ph("pointId"), bucket: ph("bucket"), min: ph("min"), max: ph("max"), sum: ph("sum"), count: ph("count"), last: ph("last"), lastTs: ph("lastTs") })
    .onConflictDoUpdate({
      target: [readings1m.pointId, readings1m.bucket],
      // SQLite evaluates every SET expression against the old row, so `last` compares old last_ts.
      set: {
        min: sql`min(${readings1m.min}, excluded.min)`,
        max: sql`max(${readings1m.max}, excluded.max)`,
        sum: sql`${readings1m.sum} + excluded.sum`,
        count: sql`${readings1m.count} + excluded.count`,
        last: sql`case when excluded.last_ts >= ${readings1m.lastTs} then excluded.last else ${readings1m.last} end`,
        lastTs: sql`max(${readings1m.lastTs}, excluded.last_ts)`,
      },
    })
    .prepare();
  const upsertLatest = db
    .insert(latestValues)
    .values({ pointId: ph("pointId"), ts: ph("ts"), value: ph("value"), text: ph("text"), quality: ph("quality"), gatewayId: ph("gatewayId"), receivedAt: ph("receivedAt") })
    .onConflictDoUpdate({
      target: latestValues.pointId,
      set: {
        ts: sql`excluded.ts`,
        value: sql`excluded.value`,
        text: sql`excluded.text`,
        quality: sql`excluded.quality`,
        gatewayId: sql`excluded.gateway_id`,
        receivedAt: sql`excluded.received_at`,
      },
      setWhere: sql`excluded.ts >= ${latestValues.ts}`,
    })
    .prepare();
  const bumpGateway = db
    .update(gateways)
    .set({
      messages: sql`${gateways.messages} + ${ph("messages")}`,
      readingsAccepted: sql`${gateways.readingsAccepted} + ${ph("accepted")}`,
      readingsDuplicate: sql`${gateways.readingsDuplicate} + ${ph("duplicates")}`,
      lastMessageAt: sql`max(coalesce(${gateways.lastMessageAt}, 0), ${ph("at")})`,
    })
    .where(eq(gateways.id, ph("id")))
    .prepare();
  const bumpRejection = db
    .insert(gatewayRejections)
    .values({ gatewayId: ph("gatewayId"), reason: ph("reason"), count: ph("count"), lastAt: ph("at") })
    .onConflictDoUpdate({ target: [gatewayRejections.gatewayId, gatewayRejections.reason], set: { count: sql`${gatewayRejections.count} + excluded.count`, lastAt: sql`excluded.last_at` } })
    .prepare();
  const bumpUnmapped = db
    .insert(gatewayUnmappedPoints)
    .values({ gatewayId: ph("gatewayId"), pointName: ph("pointName"), count: ph("count"), lastSeenAt: ph("at") })
    .onConflictDoUpdate({
      target: [gatewayUnmappedPoints.gatewayId, gatewayUnmappedPoints.pointName],
      set: { count: sql`${gatewayUnmappedPoints.count} + excluded.count`, lastSeenAt: sql`excluded.last_seen_at` },
    })
    .prepare();

  let queue: Pending[] = [];
  let queuedRows = 0;
  let timer: { kind: "timeout"; t: NodeJS.Timeout } | { kind: "immediate"; t: NodeJS.Immediate } | undefined;
  const cancel = () => {
    if (timer?.kind === "immediate") clearImmediate(timer.t);
    else if (timer) clearTimeout(timer.t);
    timer = undefined;
  };
  let closed = false;
  const stats = { flushes: 0, rows: 0, lastFlushMs: 0, maxFlushMs: 0 };

  function schedule() {
    if (queuedRows >= maxRows && timer?.kind !== "immediate") {
      cancel();
      // Still asynchronous, so a burst of messages from one socket read lands in one flush.
      timer = { kind: "immediate", t: setImmediate(flush) };
      return;
    }
    // flushMs 0: flush on the next turn of the event loop (a publisher that waits for each
    // acknowledgement, like an external broker session, then gets one message per flush).
    timer ??= flushMs === 0 ? { kind: "immediate", t: setImmediate(flush) } : { kind: "timeout", t: setTimeout(flush, flushMs) };
  }

  function writeAll(items: Pending[]): { results: SubmitResult[]; inserted: Array<RowIn & { gatewayId: string }> } {
    const inserted: Array<RowIn & { gatewayId: string }> = [];
    const results: SubmitResult[] = [];
    const rollups = new Map<string, { pointId: number; bucket: number; min: number; max: number; sum: number; count: number; last: number; lastTs: number }>();
    const latest = new Map<number, RowIn & { gatewayId: string; receivedAt: number }>();
    const perGateway = new Map<string, { messages: number; accepted: number; duplicates: number; at: number }>();
    const rejections = new Map<string, { gatewayId: string; reason: string; count: number; at: number }>();
    const unmapped = new Map<string, { gatewayId: string; pointName: string; count: number; at: number }>();

    for (const { batch } of items) {
      let accepted = 0;
      for (const row of batch.rows) {
        const r = insertReading.run({ pointId: row.pointId, ts: row.ts, value: row.value, text: row.text, quality: row.quality });
        if (r.changes === 0) continue;
        accepted++;
        const withGw = { ...row, gatewayId: batch.gatewayId };
        inserted.push(withGw);
        const prev = latest.get(row.pointId);
        if (!prev || row.ts >= prev.ts) latest.set(row.pointId, { ...withGw, receivedAt: batch.receivedAtMs });
        if (row.value !== null) {
          const bucket = Math.floor(row.ts / MINUTE_MS) * MINUTE_MS;
          const key = `${row.pointId}:${bucket}`;
          const agg = rollups.get(key);
          if (!agg) rollups.set(key, { pointId: row.pointId, bucket, min: row.value, max: row.value, sum: row.value, count: 1, last: row.value, lastTs: row.ts });
          else {
            agg.min = Math.min(agg.min, row.value);
            agg.max = Math.max(agg.max, row.value);
            agg.sum += row.value;
            agg.count++;
            if (row.ts >= agg.lastTs) {
              agg.last = row.value;
              agg.lastTs = row.ts;
            }
          }
        }
      }
      const duplicates = batch.rows.length - accepted;
      results.push({ accepted, duplicates });
      const g = perGateway.get(batch.gatewayId) ?? { messages: 0, accepted: 0, duplicates: 0, at: 0 };
      g.messages += batch.messages;
      g.accepted += accepted;
      g.duplicates += duplicates;
      g.at = Math.max(g.at, batch.receivedAtMs);
      perGateway.set(batch.gatewayId, g);
      for (const [reason, n] of Object.entries(batch.rejections ?? {})) {
        if (!n) continue;
        const key = `${batch.gatewayId}\u0000${reason}`;
        const e = rejections.get(key) ?? { gatewayId: batch.gatewayId, reason, count: 0, at: 0 };
        e.count += n;
        e.at = Math.max(e.at, batch.receivedAtMs);
        rejections.set(key, e);
      }
      for (const [pointName, n] of batch.unmapped ?? []) {
        const key = `${batch.gatewayId}\u0000${pointName}`;
        const e = unmapped.get(key) ?? { gatewayId: batch.gatewayId, pointName, count: 0, at: 0 };
        e.count += n;
        e.at = Math.max(e.at, batch.receivedAtMs);
        unmapped.set(key, e);
      }
    }
    for (const agg of rollups.values()) upsertRollup.run(agg);
    for (const v of latest.values()) {
      upsertLatest.run({ pointId: v.pointId, ts: v.ts, value: v.value, text: v.text, quality: v.quality, gatewayId: v.gatewayId, receivedAt: v.receivedAt });
    }
    for (const [id, g] of perGateway) bumpGateway.run({ id, messages: g.messages, accepted: g.accepted, duplicates: g.duplicates, at: g.at });
    for (const e of rejections.values()) bumpRejection.run({ ...e, at: new Date(e.at) });
    for (const e of unmapped.values()) bumpUnmapped.run({ ...e, at: new Date(e.at) });
    return { results, inserted };
  }

  function flush() {
    cancel();
    if (queue.length === 0) return;
    const items = queue;
    queue = [];
    queuedRows = 0;
    const started = performance.now();
    let outcome: ReturnType<typeof writeAll>;
    try {
      outcome = db.transaction(() => writeAll(items));
    } catch (err) {
      // Nothing of this flush is stored; no PUBACK goes out, so the publishers resend.
      log(`[ingest] flush of ${items.length} message(s) failed: ${String(err)}`);
      for (const p of items) p.reject(err);
      return;
    }
    const took = performance.now() - started;
    stats.flushes++;
    stats.rows += outcome.inserted.length;
    stats.lastFlushMs = took;
    stats.maxFlushMs = Math.max(stats.maxFlushMs, took);
    items.forEach((p, i) => p.resolve(outcome.results[i]));
    try {
      opts.onCommitted?.(outcome.inserted);
    } catch (err) {
      log(`[ingest] after-commit listener failed: ${String(err)}`);
    }
  }

  return {
    submit(batch) {
      if (closed) return Promise.reject(new Error("writer is closed"));
      return new Promise<SubmitResult>((resolve, reject) => {
        queue.push({ batch, resolve, reject });
        queuedRows += batch.rows.length;
        schedule();
      });
    },
    flush,
    async close() {
      closed = true;
      flush();
    },
    stats: () => ({ ...stats, queued: queuedRows }),
  };
}
