import type { Db } from "@/db/client";
import { systemClock, type Clock } from "@/lib/clock";
import { startCheckpointer } from "./checkpointer";
import type { RejectionReason } from "./contract";
import { RowColumns, type CommittedRows, type RowIn } from "./row-columns";
import type { FlushDone, FlushWire } from "./store";
import { inlineStore, workerStore, type StoreSettings } from "./store-link";
import type { Retention } from "./store-messages";

// The batched writer: everything the ingest accepted (readings, counters, rejections) is
// queued and written in one transaction per flush (gateway/store.ts). A submit resolves only
// after its transaction committed, which is what lets the broker hold the QoS 1 PUBACK until
// then (MQTT 3.1.1 §4.3.2: the receiver owns the message once it acks).
//
// With a file database the transactions run on a worker thread of their own, one flush at a
// time (gateway/store-link.ts); messages that arrive meanwhile make the next flush larger. The
// event loop keeps MQTT, rule checks, sockets and pages.

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

/** Told of every flush's outcome, so a full disk shows in the server's health. */
export interface StorageReporter {
  failed(err: unknown, where: string): void;
  committed(): void;
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
  storage?: StorageReporter;
}

export interface BatchWriter {
  submit(batch: Batch): Promise<SubmitResult>;
  /** Starts writing everything queued now (after the flush in progress, if any). */
  flush(): void;
  close(): Promise<void>;
  stats(): {
    flushes: number;
    rows: number;
    queued: number;
    lastFlushMs: number;
    maxFlushMs: number;
    openRollups: number;
    unwrittenLatest: number;
  };
  /** Drops what is held for these points (their stored history was replaced). */
  forget(pointIds: readonly number[]): void;
}

/** A submitted batch without its rows (they are in the queue's columns). */
interface Pending {
  meta: FlushWire["batches"][number];
  resolve: (r: SubmitResult) => void;
  reject: (err: unknown) => void;
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
  const storeOptions: StoreSettings = {
    graceMs: opts.rollupGraceMs ?? 10_000,
    latestEveryMs: opts.latestEveryMs ?? 2000,
    derivedRowsPerFlush: opts.derivedRowsPerFlush,
    log,
    retention: opts.retention,
  };
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
    opts.storage?.committed();
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
        opts.storage?.failed(err, "ingest");
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
