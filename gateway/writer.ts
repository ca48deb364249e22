import { createRequire } from "node:module";
import { Worker } from "node:worker_threads";
import type { Db } from "@/db/client";
import type { RejectionReason } from "./contract";
import { startPruner } from "./pruner";
import { createStore, type FlushDone, type FlushWire } from "./store";
import type { FromStore, StoreWorkerData, ToStore } from "./store-worker";

// The batched writer: everything the ingest accepted (readings, counters, rejections) is
// queued and written in one transaction per flush (gateway/store.ts). A submit resolves only
// after its transaction committed, which is what lets the broker hold the QoS 1 PUBACK until
// then (MQTT 3.1.1 §4.3.2: the receiver owns the message once it acks).
//
// With a file database the transactions run on a worker thread of their own, one flush at a
// time; messages that arrive meanwhile make the next flush larger. The event loop keeps MQTT,
// rule checks, sockets and pages; on 2 cores the commits had taken a quarter of it.

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

/**
 * The rows one flush committed, read by index: an object per row, made for the listeners and
 * dropped at once, was the largest allocation left on the ingest path (a 20-reading capacity
 * run spent a quarter of the main thread in the garbage collector).
 */
export interface CommittedRows {
  readonly length: number;
  pointId(i: number): number;
  siteId(i: number): string;
  ts(i: number): number;
  quality(i: number): 0 | 1 | 2;
  /** The value as screens get it (canonical units, booleans as booleans). */
  live(i: number): LiveValue;
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
  /** A flush starts early when no message arrived for this long (default 5 ms, at most flushMs). */
  idleMs?: number;
  /** A flush starts at once when this many rows are queued. */
  maxRows?: number;
  /** Called after each commit with the rows that were new (duplicates left out). */
  onCommitted?: (inserted: CommittedRows) => void;
  log?: (line: string) => void;
  /** Interval of the background WAL checkpoint (file databases only); 0 turns it off. */
  checkpointMs?: number;
  /** How long after a minute ends its rollup is written (readings arriving later are merged in). */
  rollupGraceMs?: number;
  /** How often latest values are written to `latest_values`; 0 writes them at every flush. */
  latestEveryMs?: number;
  /** Rollup and latest-value rows one transaction writes at most, of each (default 5,000). */
  derivedRowsPerFlush?: number;
  /** Where transactions run: "worker" (default for a file database) or "inline" (on the event loop). */
  thread?: "worker" | "inline";
  /** Retention pruning (gateway/pruner.ts), run beside the writes on the same thread. */
  retention?: Retention;
}

export interface Retention {
  rawMs: number;
  rollupMs: number;
}

export interface BatchWriter {
  submit(batch: Batch): Promise<SubmitResult>;
  /** Starts writing everything queued now (after the flush in progress, if any). */
  flush(): void;
  close(): Promise<void>;
  stats(): { flushes: number; rows: number; queued: number; lastFlushMs: number; maxFlushMs: number; openRollups: number; unwrittenLatest: number };
  /** Drops what is held for these points (their stored history was replaced). */
  forget(pointIds: readonly number[]): void;
}

// A PASSIVE checkpoint every 100 ms on its own connection in a worker thread: it copies
// committed WAL pages back into the database (and fsyncs) while the event loop goes on
// committing, so SQLite's automatic checkpoint, which runs inside a commit and blocks the event
// loop, is only a safety net (db/client.ts). Measured on 20k points, 2,000-row flushes at
// ~35k rows/s: p99 flush 30 ms with the default in-commit checkpoint, 22 ms with this one.
const checkpointWorkerSource = `
const { parentPort, workerData } = require("node:worker_threads");
const Database = require(workerData.driver);
const db = new Database(workerData.file, { fileMustExist: true });
db.pragma("busy_timeout = 1000");
const timer = setInterval(() => {
  try { db.pragma("wal_checkpoint(PASSIVE)"); } catch { /* busy or closing: the next round retries */ }
}, workerData.everyMs);
parentPort.once("message", () => { clearInterval(timer); db.close(); parentPort.close(); });
`;

export function startCheckpointer(file: string, everyMs: number, log: (line: string) => void): { stop(): Promise<void> } {
  const worker = new Worker(checkpointWorkerSource, { eval: true, workerData: { driver: createRequire(import.meta.url).resolve("better-sqlite3"), file, everyMs } });
  worker.unref();
  worker.on("error", (err) => log(`[ingest] background checkpoint stopped: ${String(err)}`));
  return {
    stop: () =>
      new Promise<void>((resolve) => {
        worker.once("exit", () => resolve());
        // Waited for now: keep the process up until it has closed its connection.
        worker.ref();
        worker.postMessage("stop");
        setTimeout(() => void worker.terminate(), 2000).unref();
      }),
  };
}

/** A submitted batch without its rows (they are in the queue's columns). */
interface Pending {
  meta: FlushWire["batches"][number];
  resolve: (r: SubmitResult) => void;
  reject: (err: unknown) => void;
}

const ROW_NUMBER = 0;
const ROW_BOOLEAN = 1;
const ROW_TEXT = 2;

/**
 * Queued rows as columns. Rows wait here from submit until their flush commits, which under
 * load spans a young-generation collection or two: as an object each, they were copied by
 * those collections and promoted to the old generation. In a 20-reading capacity run (about
 * 190,000 readings/s) the main thread's scavenges took 3.8 s of the last 18 s with row objects
 * queued and 2.3 s with columns (--trace-gc). After the commit, listeners read the new rows
 * through a view of these columns (CommittedRows), still with no object per row.
 */
class RowColumns {
  length = 0;
  pointId: Int32Array;
  ts: Float64Array;
  value: Float64Array;
  quality: Uint8Array;
  kind: Uint8Array;
  siteId: string[] = [];
  texts: Array<[row: number, text: string]> = [];

  constructor(capacity: number) {
    this.pointId = new Int32Array(capacity);
    this.ts = new Float64Array(capacity);
    this.value = new Float64Array(capacity);
    this.quality = new Uint8Array(capacity);
    this.kind = new Uint8Array(capacity);
  }

  push(r: RowIn) {
    const i = this.length;
    if (i === this.pointId.length) this.grow();
    this.pointId[i] = r.pointId;
    this.ts[i] = r.ts;
    this.value[i] = r.value ?? NaN;
    this.quality[i] = r.quality;
    this.kind[i] = r.text !== null ? ROW_TEXT : typeof r.live === "boolean" ? ROW_BOOLEAN : ROW_NUMBER;
    this.siteId.push(r.siteId);
    if (r.text !== null) this.texts.push([i, r.text]);
    this.length = i + 1;
  }

  /** The rows listed in `rows` (indexes into these columns), as listeners of committed rows read them. */
  view(rows: Int32Array): CommittedRows {
    const texts = new Map(this.texts);
    return {
      length: rows.length,
      pointId: (i) => this.pointId[rows[i]],
      siteId: (i) => this.siteId[rows[i]],
      ts: (i) => this.ts[rows[i]],
      quality: (i) => this.quality[rows[i]] as 0 | 1 | 2,
      live: (i) => {
        const k = rows[i];
        const kind = this.kind[k];
        return kind === ROW_TEXT ? (texts.get(k) ?? "") : kind === ROW_BOOLEAN ? this.value[k] !== 0 : this.value[k];
      },
    };
  }

  private grow() {
    const n = this.pointId.length * 2;
    const into = <T extends Int32Array | Float64Array | Uint8Array>(bigger: T, from: T) => (bigger.set(from), bigger);
    this.pointId = into(new Int32Array(n), this.pointId);
    this.ts = into(new Float64Array(n), this.ts);
    this.value = into(new Float64Array(n), this.value);
    this.quality = into(new Uint8Array(n), this.quality);
    this.kind = into(new Uint8Array(n), this.kind);
  }
}

/** Where a flush is committed: the same calls whether on this thread or the store worker. */
interface StoreLink {
  write(flush: FlushWire): Promise<FlushDone>;
  maintain(nowMs: number): void;
  forget(pointIds: readonly number[]): void;
  close(nowMs: number): Promise<void>;
  stats(): { openRollups: number; unwrittenLatest: number };
}

type StoreSettings = { graceMs: number; latestEveryMs: number; derivedRowsPerFlush?: number; log: (line: string) => void; retention?: Retention };

function inlineStore(db: Db, clock: Clock, options: StoreSettings & { nowMs: number }): StoreLink {
  const store = createStore(db.$client, options);
  const pruner = options.retention && startPruner({ db, clock, rawRetentionMs: options.retention.rawMs, rollupRetentionMs: options.retention.rollupMs, log: options.log });
  return {
    write: async (flush) => store.write(flush),
    maintain: (nowMs) => store.maintain(nowMs),
    forget: (pointIds) => store.forget(pointIds),
    close: async (nowMs) => {
      pruner?.stop();
      store.close(nowMs);
    },
    stats: () => store.stats(),
  };
}

function workerStore(file: string, options: StoreSettings & { nowMs: () => number }): StoreLink {
  const { log } = options;
  const flushes = new Map<number, { resolve: (d: FlushDone) => void; reject: (err: Error) => void }>();
  let lastStats = { openRollups: 0, unwrittenLatest: 0 };
  let closing: (() => void) | undefined;
  let worker: Worker;
  let startedAt = 0;
  /** Set when a worker died right after starting: another would too, so writes are refused. */
  let broken: Error | undefined;

  function start() {
    startedAt = Date.now();
    const data: StoreWorkerData = { file, graceMs: options.graceMs, latestEveryMs: options.latestEveryMs, derivedRowsPerFlush: options.derivedRowsPerFlush, nowMs: options.nowMs(), retention: options.retention };
    worker = new Worker(new URL("./store-worker.mjs", import.meta.url), { workerData: data });
    worker.on("message", (m: FromStore) => {
      if (m.type === "log") log(m.line);
      else if (m.type === "flushed") {
        lastStats = m.stats;
        flushes.get(m.id)?.resolve({ id: m.id, accepted: m.accepted, inserted: m.inserted });
        flushes.delete(m.id);
      } else if (m.type === "flushFailed") {
        flushes.get(m.id)?.reject(new Error(m.error));
        flushes.delete(m.id);
      } else if (m.type === "closed") closing?.();
    });
    worker.on("error", (err) => log(`[ingest] store worker failed: ${err.stack ?? String(err)}`));
    worker.on("exit", (code) => {
      // Nothing it was writing is acknowledged; gateways resend. A new worker rebuilds what was
      // held in memory from raw readings, as after any unclean stop.
      for (const f of flushes.values()) f.reject(new Error(`store worker exited (${code})`));
      flushes.clear();
      if (closing) return closing();
      if (Date.now() - startedAt < 5000) {
        broken = new Error(`the store worker exited with ${code} right after starting`);
        log(`[ingest] ${broken.message}; readings are refused (not acknowledged) until the server restarts`);
        return;
      }
      log(`[ingest] store worker exited with ${code}; starting another`);
      start();
    });
  }
  start();
  const post = (m: ToStore, transfer: ArrayBuffer[] = []) => worker.postMessage(m, transfer);

  return {
    write: (flush) =>
      new Promise<FlushDone>((resolve, reject) => {
        if (broken) return reject(broken);
        flushes.set(flush.id, { resolve, reject });
        post({ type: "flush", flush }, [flush.pointId.buffer as ArrayBuffer, flush.ts.buffer as ArrayBuffer, flush.value.buffer as ArrayBuffer, flush.quality.buffer as ArrayBuffer]);
      }),
    maintain: (nowMs) => post({ type: "maintain", nowMs }),
    forget: (pointIds) => post({ type: "forget", pointIds: [...pointIds] }),
    close: (nowMs) =>
      new Promise<void>((resolve) => {
        closing = resolve;
        if (broken) return resolve();
        post({ type: "close", nowMs });
      }),
    stats: () => lastStats,
  };
}

/** A flush's rows as the store gets them: copies, since the store worker takes the buffers. */
function encodeFlush(id: number, nowMs: number, items: readonly Pending[], rows: RowColumns): FlushWire {
  const n = rows.length;
  return {
    id,
    nowMs,
    pointId: rows.pointId.slice(0, n),
    ts: rows.ts.slice(0, n),
    value: rows.value.slice(0, n),
    quality: rows.quality.slice(0, n),
    texts: rows.texts,
    batches: items.map((p) => p.meta),
  };
}

export function createBatchWriter(opts: WriterOptions): BatchWriter {
  const { db } = opts;
  const clock = opts.clock ?? systemClock;
  const flushMs = opts.flushMs ?? 50;
  const maxRows = opts.maxRows ?? 5000;
  const idleMs = Math.max(1, Math.min(flushMs, opts.idleMs ?? 5));
  const log = opts.log ?? (() => {});
  const sqlite = db.$client;
  const file = sqlite.memory ? undefined : sqlite.name;
  const storeOptions: StoreSettings = { graceMs: opts.rollupGraceMs ?? 10_000, latestEveryMs: opts.latestEveryMs ?? 2000, derivedRowsPerFlush: opts.derivedRowsPerFlush, log, retention: opts.retention };
  const store =
    file && (opts.thread ?? "worker") === "worker"
      ? workerStore(file, { ...storeOptions, nowMs: () => clock.now() })
      : inlineStore(db, clock, { ...storeOptions, nowMs: clock.now() });

  const checkpointMs = opts.checkpointMs ?? 100;
  const checkpointer = file && checkpointMs > 0 ? startCheckpointer(file, checkpointMs, log) : undefined;

  const initialRows = Math.max(1024, maxRows);
  let queue: Pending[] = [];
  let rows = new RowColumns(initialRows);
  let timer: { kind: "timeout"; t: NodeJS.Timeout } | { kind: "immediate"; t: NodeJS.Immediate } | undefined;
  const cancel = () => {
    if (timer?.kind === "immediate") clearImmediate(timer.t);
    else if (timer) clearTimeout(timer.t);
    timer = undefined;
  };
  let closed = false;
  const stats = { flushes: 0, rows: 0, lastFlushMs: 0, maxFlushMs: 0 };
  let nextId = 1;
  /** The flush being committed; at most one at a time, the next one waits and grows meanwhile. */
  let inFlight: Promise<void> | undefined;
  let flushWhenDone = false;

  // A flush starts flushMs after the first queued message at the latest, and sooner once no
  // message arrived for idleMs (a burst is over): under steady load batches stay large, while
  // a quiet moment does not make the last messages of a burst wait out the whole window.
  let firstAt = 0;
  let lastAt = 0;
  function onTimer() {
    timer = undefined;
    const now = performance.now();
    const deadline = firstAt + flushMs;
    if (now >= deadline || now - lastAt >= idleMs) return flush();
    timer = { kind: "timeout", t: setTimeout(onTimer, Math.max(1, Math.min(idleMs - (now - lastAt), deadline - now))) };
  }

  function schedule() {
    if (rows.length >= maxRows && timer?.kind !== "immediate") {
      cancel();
      // Still asynchronous, so a burst of messages from one socket read lands in one flush.
      timer = { kind: "immediate", t: setImmediate(flush) };
      return;
    }
    // flushMs 0: flush on the next turn of the event loop (a publisher that waits for each
    // acknowledgement, like an external broker session, then gets one message per flush).
    if (flushMs === 0) {
      timer ??= { kind: "immediate", t: setImmediate(flush) };
      return;
    }
    lastAt = performance.now();
    if (!timer) {
      firstAt = lastAt;
      timer = { kind: "timeout", t: setTimeout(onTimer, idleMs) };
    }
  }

  function settle(items: readonly Pending[], done: FlushDone, started: number, flushed: RowColumns) {
    let n = 0;
    for (let i = 0; i < flushed.length; i++) if (done.inserted[i]) n++;
    const rows = new Int32Array(n);
    for (let i = 0, j = 0; i < flushed.length; i++) if (done.inserted[i]) rows[j++] = i;
    const inserted = flushed.view(rows);
    items.forEach((p, b) => p.resolve({ accepted: done.accepted[b], duplicates: p.meta.count - done.accepted[b] }));
    const took = performance.now() - started;
    stats.flushes++;
    stats.rows += inserted.length;
    stats.lastFlushMs = took;
    stats.maxFlushMs = Math.max(stats.maxFlushMs, took);
    try {
      opts.onCommitted?.(inserted);
    } catch (err) {
      log(`[ingest] after-commit listener failed: ${String(err)}`);
    }
  }

  function flush() {
    cancel();
    if (queue.length === 0) return;
    if (inFlight) {
      flushWhenDone = true;
      return;
    }
    const items = queue;
    const flushed = rows;
    queue = [];
    rows = new RowColumns(initialRows);
    const started = performance.now();
    inFlight = store.write(encodeFlush(nextId++, clock.now(), items, flushed)).then(
      (done) => settle(items, done, started, flushed),
      (err) => {
        // Nothing of this flush is stored; no PUBACK goes out, so the publishers resend.
        log(`[ingest] flush of ${items.length} message(s) failed: ${String(err)}`);
        for (const p of items) p.reject(err);
      },
    );
    void inFlight.finally(() => {
      inFlight = undefined;
      if (flushWhenDone || rows.length >= maxRows) {
        flushWhenDone = false;
        flush();
      }
    });
  }

  // Seals closed minutes and writes latest values when no readings arrive to carry them.
  const maintenance = setInterval(() => {
    if (queue.length === 0 && !inFlight) store.maintain(clock.now());
  }, 1000);
  maintenance.unref();

  return {
    submit(batch) {
      if (closed) return Promise.reject(new Error("writer is closed"));
      return new Promise<SubmitResult>((resolve, reject) => {
        const list = batch.rows;
        for (let i = 0; i < list.length; i++) rows.push(list[i]);
        const meta = {
          gatewayId: batch.gatewayId,
          count: list.length,
          messages: batch.messages,
          receivedAtMs: batch.receivedAtMs,
          rejections: batch.rejections,
          unmapped: batch.unmapped ? [...batch.unmapped] : undefined,
        };
        queue.push({ meta, resolve, reject });
        schedule();
      });
    },
    flush,
    async close() {
      if (closed) return;
      closed = true;
      clearInterval(maintenance);
      while (inFlight || queue.length) {
        flush();
        await inFlight;
      }
      // A clean stop leaves nothing to rebuild: every open minute and latest value is written.
      await store.close(clock.now());
      await checkpointer?.stop();
    },
    stats: () => ({ ...stats, queued: rows.length, ...store.stats() }),
    forget: (pointIds) => store.forget(pointIds),
  };
}
