import type Database from "better-sqlite3";
import { ingestState } from "./ingest-state";
import { createRollupBook, type SealProgress } from "./rollups";

// The SQL side of the batched writer: one transaction per flush through prepared statements,
// on whichever thread owns the write connection (gateway/store-worker.ts for a file database,
// the event loop for an in-memory one). A flush travels as columns in typed arrays, so handing
// it to the worker copies no row objects.
//
// What is derived from readings is written behind them, in the same flush transactions: a
// minute's rollup when the minute has closed (gateway/rollups.ts), the latest value of each
// point every latestEveryMs. Each of them cost a b-tree page per point per flush when written
// at every flush. Both are rebuilt from raw readings after an unclean stop.

/** One flush on the wire: rows as columns, with the messages (batches) they came in. */
export interface FlushWire {
  id: number;
  /** The writer's clock when the flush started (seal limits, latest-value timing). */
  nowMs: number;
  pointId: Int32Array;
  ts: Float64Array;
  /** NaN where the row has no number (state and text points). */
  value: Float64Array;
  quality: Uint8Array;
  /** Text of state and text rows, by row index. */
  texts: Array<[row: number, text: string]>;
  batches: Array<{
    gatewayId: string;
    /** Rows [start, start + count) are this batch's. */
    count: number;
    messages: number;
    receivedAtMs: number;
    rejections?: Record<string, number>;
    unmapped?: Array<[pointName: string, count: number]>;
  }>;
}

export interface FlushDone {
  id: number;
  /** Per batch: rows that were new. */
  accepted: Int32Array;
  /** Per row: 1 when stored, 0 for a duplicate of a stored (point, ts). */
  inserted: Uint8Array;
}

export interface StoreOptions {
  graceMs: number;
  latestEveryMs: number;
  /** Rollup and latest-value rows one transaction writes at most, of each (default 5,000). */
  derivedRowsPerFlush?: number;
  nowMs: number;
  log: (line: string) => void;
}

export interface Store {
  write(flush: FlushWire): FlushDone;
  /** Seals closed minutes and writes due latest values when no readings carry them; a failure is logged and retried next time. */
  maintain(nowMs: number): void;
  forget(pointIds: readonly number[]): void;
  /** Writes everything held and marks the stop clean (nothing to rebuild at the next start). */
  close(nowMs: number): void;
  stats(): { openRollups: number; unwrittenLatest: number };
}

interface LatestEntry {
  ts: number;
  value: number | null;
  text: string | null;
  quality: number;
  gatewayId: string;
  receivedAt: number;
  /** Newer than its latest_values row (listed in `unwritten`). */
  dirty: boolean;
}

export function createStore(sqlite: Database.Database, opts: StoreOptions): Store {
  const { log } = opts;
  // Raw better-sqlite3 statements, prepared once: on the hot path Drizzle's per-call
  // placeholder filling and entity checks cost more than the inserts themselves.
  // Idempotent on (point_id, ts): a redelivered message adds nothing.
  const insertReading = sqlite.prepare(
    "insert into readings (point_id, ts, value, text, quality) values (?, ?, ?, ?, ?) on conflict do nothing",
  );
  const upsertLatest = sqlite.prepare(
    `insert into latest_values (point_id, ts, value, text, quality, gateway_id, received_at) values (?, ?, ?, ?, ?, ?, ?)
     on conflict (point_id) do update set
       ts = excluded.ts, value = excluded.value, text = excluded.text, quality = excluded.quality,
       gateway_id = excluded.gateway_id, received_at = excluded.received_at
     where excluded.ts >= latest_values.ts`,
  );
  const bumpGateway = sqlite.prepare(
    `update gateways set messages = messages + ?, readings_accepted = readings_accepted + ?, readings_duplicate = readings_duplicate + ?,
       last_message_at = max(coalesce(last_message_at, 0), ?)
     where id = ?`,
  );
  const bumpRejection = sqlite.prepare(
    `insert into gateway_rejections (gateway_id, reason, count, last_at) values (?, ?, ?, ?)
     on conflict (gateway_id, reason) do update set count = gateway_rejections.count + excluded.count, last_at = excluded.last_at`,
  );
  const bumpUnmapped = sqlite.prepare(
    `insert into gateway_unmapped_points (gateway_id, point_name, count, last_seen_at) values (?, ?, ?, ?)
     on conflict (gateway_id, point_name) do update set count = gateway_unmapped_points.count + excluded.count, last_seen_at = excluded.last_seen_at`,
  );
  const state = ingestState(sqlite);
  // After an unclean stop the newest reading of a point may be newer than its latest_values row.
  const recoverLatest = sqlite.prepare(
    `insert into latest_values (point_id, ts, value, text, quality, gateway_id, received_at)
     select r.point_id, r.ts, r.value, r.text, r.quality, null, r.ts
     from points p join readings r on r.point_id = p.id and r.ts = (select max(ts) from readings where point_id = p.id)
     where true
     on conflict (point_id) do update set ts = excluded.ts, value = excluded.value, text = excluded.text, quality = excluded.quality, received_at = excluded.received_at
     where excluded.ts > latest_values.ts`,
  );

  const rollups = createRollupBook(sqlite, { graceMs: opts.graceMs, nowMs: opts.nowMs });
  if (state.get("closed_cleanly") === 0) {
    const t0 = performance.now();
    const pointIds = sqlite.prepare("select id from points").pluck().all() as number[];
    const replayed = rollups.recover(pointIds);
    const latest = recoverLatest.run().changes;
    log(
      `[ingest] recovered from an unclean stop: ${replayed} readings of open rollup minutes, ${latest} latest values (${Math.round(performance.now() - t0)} ms)`,
    );
  }
  state.set("closed_cleanly", 0);

  /** Committed rows' latest values not yet in latest_values; entries are reused, not reallocated. */
  const latest = new Map<number, LatestEntry>();
  let unwritten: number[] = [];
  let latestWrittenAt = opts.nowMs;
  /** A backlog of latest values is being written, a budget per flush. */
  let draining = false;
  // What one transaction writes of derived rows at most (each kind), so no flush waits long.
  const budget = opts.derivedRowsPerFlush ?? 5000;

  interface Plan {
    sealLimit: number;
    writeLatest: boolean;
    /** Filled in by the transaction. */
    sealed?: SealProgress;
    latestWritten?: number;
  }
  const plan = (nowMs: number): Plan => ({
    sealLimit: rollups.limit(nowMs),
    writeLatest: unwritten.length > 0 && (draining || nowMs - latestWrittenAt >= opts.latestEveryMs),
  });

  function writeDerived(p: Plan, everything = false) {
    p.sealed = rollups.writeSealed(p.sealLimit, everything ? Infinity : budget);
    if (!p.writeLatest) return;
    const n = everything ? unwritten.length : Math.min(budget, unwritten.length);
    for (let i = 0; i < n; i++) {
      const id = unwritten[i];
      const e = latest.get(id)!;
      upsertLatest.run(id, e.ts, e.value, e.text, e.quality, e.gatewayId, e.receivedAt);
    }
    p.latestWritten = n;
  }

  /** In-memory state follows only what committed: a failed transaction leaves it as it was. */
  function afterCommit(p: Plan, nowMs: number) {
    if (p.sealed) rollups.markSealed(p.sealed);
    if (p.latestWritten) {
      for (let i = 0; i < p.latestWritten; i++) latest.get(unwritten[i])!.dirty = false;
      unwritten = p.latestWritten === unwritten.length ? [] : unwritten.slice(p.latestWritten);
      draining = unwritten.length > 0;
      if (!draining) latestWrittenAt = nowMs;
    }
  }

  /** A row's number, or null for state and text points (NaN on the wire). */
  const numberAt = (f: FlushWire, row: number) => (Number.isNaN(f.value[row]) ? null : f.value[row]);

  const flushTx = sqlite.transaction(
    (f: FlushWire, texts: ReadonlyMap<number, string>, p: Plan, inserted: Uint8Array, accepted: Int32Array) => {
      const perGateway = new Map<string, { messages: number; accepted: number; duplicates: number; at: number }>();
      const rejections = new Map<string, { gatewayId: string; reason: string; count: number; at: number }>();
      const unmapped = new Map<string, { gatewayId: string; pointName: string; count: number; at: number }>();
      let row = 0;
      for (let b = 0; b < f.batches.length; b++) {
        const batch = f.batches[b];
        let n = 0;
        for (const end = row + batch.count; row < end; row++) {
          const value = numberAt(f, row);
          const text = value === null ? (texts.get(row) ?? null) : null;
          if (insertReading.run(f.pointId[row], f.ts[row], value, text, f.quality[row]).changes === 0) continue;
          inserted[row] = 1;
          n++;
          // A reading of a minute being sealed now (or sealed before) goes straight into its row;
          // the rest join their open minute once this transaction has committed.
          if (value !== null && f.ts[row] < p.sealLimit) rollups.writeLate(f.pointId[row], f.ts[row], value);
        }
        accepted[b] = n;
        let g = perGateway.get(batch.gatewayId);
        if (!g) perGateway.set(batch.gatewayId, (g = { messages: 0, accepted: 0, duplicates: 0, at: 0 }));
        g.messages += batch.messages;
        g.accepted += n;
        g.duplicates += batch.count - n;
        if (batch.receivedAtMs > g.at) g.at = batch.receivedAtMs;
        for (const [reason, count] of Object.entries(batch.rejections ?? {})) {
          if (!count) continue;
          const key = `${batch.gatewayId}\u0000${reason}`;
          const e = rejections.get(key) ?? { gatewayId: batch.gatewayId, reason, count: 0, at: 0 };
          e.count += count;
          e.at = Math.max(e.at, batch.receivedAtMs);
          rejections.set(key, e);
        }
        for (const [pointName, count] of batch.unmapped ?? []) {
          const key = `${batch.gatewayId}\u0000${pointName}`;
          const e = unmapped.get(key) ?? { gatewayId: batch.gatewayId, pointName, count: 0, at: 0 };
          e.count += count;
          e.at = Math.max(e.at, batch.receivedAtMs);
          unmapped.set(key, e);
        }
      }
      writeDerived(p);
      for (const [id, g] of perGateway) bumpGateway.run(g.messages, g.accepted, g.duplicates, g.at, id);
      for (const e of rejections.values()) bumpRejection.run(e.gatewayId, e.reason, e.count, e.at);
      for (const e of unmapped.values()) bumpUnmapped.run(e.gatewayId, e.pointName, e.count, e.at);
    },
  );
  const maintainTx = sqlite.transaction((p: Plan, everything: boolean) => writeDerived(p, everything));

  function maintain(nowMs: number, everything: boolean) {
    const p = plan(nowMs);
    if (everything) {
      p.sealLimit = rollups.limitAll(nowMs);
      p.writeLatest = unwritten.length > 0;
    } else if (!rollups.sealDue(nowMs) && !p.writeLatest) return;
    maintainTx(p, everything);
    afterCommit(p, nowMs);
  }

  function remember(f: FlushWire, texts: ReadonlyMap<number, string>, inserted: Uint8Array, sealLimit: number) {
    let row = 0;
    for (const batch of f.batches) {
      for (const end = row + batch.count; row < end; row++) {
        if (!inserted[row]) continue;
        const id = f.pointId[row];
        const ts = f.ts[row];
        const value = numberAt(f, row);
        const text = value === null ? (texts.get(row) ?? null) : null;
        if (value !== null && ts >= sealLimit) rollups.add(id, ts, value);
        let e = latest.get(id);
        if (!e)
          latest.set(
            id,
            (e = {
              ts,
              value,
              text,
              quality: f.quality[row],
              gatewayId: batch.gatewayId,
              receivedAt: batch.receivedAtMs,
              dirty: false,
            }),
          );
        else if (ts >= e.ts) {
          e.ts = ts;
          e.value = value;
          e.text = text;
          e.quality = f.quality[row];
          e.gatewayId = batch.gatewayId;
          e.receivedAt = batch.receivedAtMs;
        } else continue;
        if (!e.dirty) {
          e.dirty = true;
          unwritten.push(id);
        }
      }
    }
  }

  return {
    write(f) {
      const p = plan(f.nowMs);
      const texts = new Map(f.texts);
      const inserted = new Uint8Array(f.pointId.length);
      const accepted = new Int32Array(f.batches.length);
      flushTx(f, texts, p, inserted, accepted);
      afterCommit(p, f.nowMs);
      remember(f, texts, inserted, p.sealLimit);
      return { id: f.id, accepted, inserted };
    },
    maintain(nowMs) {
      try {
        maintain(nowMs, false);
      } catch (err) {
        log(`[ingest] writing rollups and latest values failed (retried later): ${String(err)}`);
      }
    },
    forget(pointIds) {
      rollups.forget(pointIds);
      const gone = new Set(pointIds);
      for (const id of pointIds) latest.delete(id);
      unwritten = unwritten.filter((id) => !gone.has(id));
    },
    close(nowMs) {
      maintain(nowMs, true);
      state.set("closed_cleanly", 1);
    },
    stats: () => ({ openRollups: rollups.size(), unwrittenLatest: unwritten.length }),
  };
}
