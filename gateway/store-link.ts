import { Worker } from "node:worker_threads";
import type { Db } from "@/db/client";
import type { Clock } from "@/lib/clock";
import { startPruner } from "./pruner";
import { createStore, type FlushDone, type FlushWire } from "./store";
import type { FromStore, Retention, StoreWorkerData, ToStore } from "./store-messages";

// The batch writer's link to the store: the store itself on this thread (an in-memory
// database, or when asked), or the store worker thread that owns a file database's write
// connection, so commits do not hold up the event loop.

/** Where a flush is committed: the same calls whether on this thread or the store worker. */
export interface StoreLink {
  write(flush: FlushWire): Promise<FlushDone>;
  maintain(nowMs: number): void;
  forget(pointIds: readonly number[]): void;
  close(nowMs: number): Promise<void>;
  stats(): { openRollups: number; unwrittenLatest: number };
}

export type StoreSettings = {
  graceMs: number;
  latestEveryMs: number;
  derivedRowsPerFlush?: number;
  log: (line: string) => void;
  retention?: Retention;
};

export function inlineStore(db: Db, clock: Clock, options: StoreSettings & { nowMs: number }): StoreLink {
  const store = createStore(db.$client, options);
  const pruner =
    options.retention &&
    startPruner({
      db,
      clock,
      rawRetentionMs: options.retention.rawMs,
      rollupRetentionMs: options.retention.rollupMs,
      log: options.log,
    });
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

export function workerStore(file: string, options: StoreSettings & { nowMs: () => number }): StoreLink {
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
    const data: StoreWorkerData = {
      file,
      graceMs: options.graceMs,
      latestEveryMs: options.latestEveryMs,
      derivedRowsPerFlush: options.derivedRowsPerFlush,
      nowMs: options.nowMs(),
      retention: options.retention,
    };
    worker = new Worker(new URL("./store-worker.mjs", import.meta.url), { workerData: data });
    worker.on("message", (m: FromStore) => {
      if (m.type === "log") log(m.line);
      else if (m.type === "flushed") {
        lastStats = m.stats;
        flushes.get(m.id)?.resolve({ id: m.id, accepted: m.accepted, inserted: m.inserted });
        flushes.delete(m.id);
      } else if (m.type === "flushFailed") {
        flushes.get(m.id)?.reject(Object.assign(new Error(m.error), m.code ? { code: m.code } : {}));
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
        post({ type: "flush", flush }, [
          flush.pointId.buffer as ArrayBuffer,
          flush.ts.buffer as ArrayBuffer,
          flush.value.buffer as ArrayBuffer,
          flush.quality.buffer as ArrayBuffer,
        ]);
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
