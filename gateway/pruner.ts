import type { Db } from "@/db/client";
import { allPointIds, pruneChunk } from "@/db/queries/readings";
import type { Clock } from "./writer";

// Retention: raw readings for RAW_RETENTION_DAYS (14 by default), 1-minute rollups two years.
// Runs in small chunks with a yield between them, so an ingestion flush never waits for more
// than one chunk.

export interface PrunerOptions {
  db: Db;
  clock: Clock;
  rawRetentionMs: number;
  rollupRetentionMs: number;
  everyMs?: number;
  chunk?: number;
  log?: (line: string) => void;
}

export interface Pruner {
  runOnce(): Promise<{ readings: number; rollups: number }>;
  stop(): void;
}

const yieldToEventLoop = () => new Promise<void>((resolve) => setImmediate(resolve));

export function startPruner(opts: PrunerOptions): Pruner {
  const chunk = opts.chunk ?? 2000;
  let running: Promise<{ readings: number; rollups: number }> | null = null;
  let stopped = false;

  async function pass() {
    const now = opts.clock.now();
    const totals = { readings: 0, rollups: 0 };
    for (const pointId of allPointIds(opts.db)) {
      for (const [table, before, key] of [
        ["readings", now - opts.rawRetentionMs, "readings"],
        ["readings_1m", now - opts.rollupRetentionMs, "rollups"],
      ] as const) {
        for (;;) {
          if (stopped) return totals;
          const n = pruneChunk(opts.db, table, pointId, before, chunk);
          totals[key] += n;
          if (n < chunk) break;
          await yieldToEventLoop();
        }
      }
      await yieldToEventLoop();
    }
    if (totals.readings || totals.rollups) opts.log?.(`[prune] removed ${totals.readings} raw readings and ${totals.rollups} rollups past retention`);
    return totals;
  }

  function runOnce() {
    running ??= pass().finally(() => (running = null));
    return running;
  }

  const timer = setInterval(() => void runOnce().catch((err) => opts.log?.(`[prune] failed: ${String(err)}`)), opts.everyMs ?? 60 * 60_000);
  timer.unref();
  const first = setTimeout(() => void runOnce().catch(() => {}), 30_000);
  first.unref();

  return {
    runOnce,
    stop() {
      stopped = true;
      clearInterval(timer);
      clearTimeout(first);
    },
  };
}
