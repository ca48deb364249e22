import type { FlushWire } from "./store";

// What passes between the batch writer (gateway/store-link.ts) and the store worker thread
// (gateway/store-worker.ts), kept apart from both so neither imports the other.

/** How long readings are kept: raw, and as 1-minute and 1-hour rollups. */
export interface Retention {
  rawMs: number;
  rollupMs: number;
}

export type ToStore =
  | { type: "flush"; flush: FlushWire }
  | { type: "maintain"; nowMs: number }
  | { type: "forget"; pointIds: number[] }
  | { type: "close"; nowMs: number };

export type FromStore =
  | { type: "log"; line: string }
  | {
      type: "flushed";
      id: number;
      accepted: Int32Array;
      inserted: Uint8Array;
      stats: { openRollups: number; unwrittenLatest: number };
    }
  /** `code` is SQLite's or the OS's error code (SQLITE_FULL, ENOSPC, …) when the error had one. */
  | { type: "flushFailed"; id: number; error: string; code?: string }
  | { type: "closed" };

export interface StoreWorkerData {
  file: string;
  graceMs: number;
  latestEveryMs: number;
  derivedRowsPerFlush?: number;
  nowMs: number;
  retention?: Retention;
}
