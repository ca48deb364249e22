import type { Db } from "@/db/client";
import { allPointIds } from "@/db/queries/readings";
import type { Clock } from "@/lib/clock";

// Retention: raw readings for RAW_RETENTION_DAYS (14 by default), 1-minute and 1-hour rollups two
// years (their tables are walked once a day, raw readings at every pass).
// Runs in small chunks, a few ms of work at a time with a pause between, so an ingestion flush
// never waits for more than one slice and the pass never takes more than part of the CPU.

export interface PrunerOptions {
  db: Db;
  clock: Clock;
  rawRetentionMs: number;
  rollupRetentionMs: number;
  /** Time between passes (default one hour). */
  everyMs?: number;
  /**
   * Delay of the first pass after start (default 10 min). Right after a restart gateways send
   * what they buffered meanwhile and ingestion runs flat out; readings a few minutes past
   * retention can wait.
   */
  firstRunMs?: number;
  chunk?: number;
  log?: (line: string) => void;
}

export interface Pruner {
  runOnce(): Promise<{ readings: number; rollups: number }>;
  stop(): void;
}

/** Work per slice, then a pause: at most about a third of one core while a pass runs. */
const SLICE_MS = 5;
const PAUSE_MS = 10;
const pause = () => new Promise<void>((resolve) => setTimeout(resolve, PAUSE_MS));
/** Rollup tables are walked at most this often (raw readings at every pass). */
const ROLLUP_PASS_EVERY_MS = 24 * 3_600_000;

export function startPruner(opts: PrunerOptions): Pruner {
  const chunk = opts.chunk ?? 2000;
  let running: Promise<{ readings: number; rollups: number }> | null = null;
  let stopped = false;
  // Rollups are kept two years, so walking their two tables once a day is enough.
  let rollupsPrunedAt = -Infinity;

  // Prepared once per pruner, not per point: the primary key is (point_id, ts|bucket), so each
  // call is a range delete of one point, never a table scan.
  const statements = (["readings", "readings_1m", "readings_1h"] as const).map((table) => {
    const col = table === "readings" ? "ts" : "bucket";
    return opts.db.$client.prepare<[number, number, number, number]>(
      `delete from ${table} where point_id = ? and ${col} in (select ${col} from ${table} where point_id = ? and ${col} < ? order by ${col} limit ?)`,
    );
  });

  async function pass() {
    const now = opts.clock.now();
    const totals = { readings: 0, rollups: 0 };
    const rollupsDue = now - rollupsPrunedAt >= ROLLUP_PASS_EVERY_MS;
    const plan = [
      { stmt: statements[0], before: now - opts.rawRetentionMs, key: "readings" as const },
      ...(rollupsDue
        ? [
            { stmt: statements[1], before: now - opts.rollupRetentionMs, key: "rollups" as const },
            { stmt: statements[2], before: now - opts.rollupRetentionMs, key: "rollups" as const },
          ]
        : []),
    ];
    let sliceEnds = performance.now() + SLICE_MS;
    for (const pointId of allPointIds(opts.db)) {
      for (const { stmt, before, key } of plan) {
        for (;;) {
          if (stopped) return totals;
          const n = stmt.run(pointId, pointId, before, chunk).changes;
          totals[key] += n;
          if (performance.now() >= sliceEnds) {
            await pause();
            sliceEnds = performance.now() + SLICE_MS;
          }
          if (n < chunk) break;
        }
      }
    }
    if (rollupsDue) rollupsPrunedAt = now;
    if (totals.readings || totals.rollups)
      opts.log?.(`[prune] removed ${totals.readings} raw readings and ${totals.rollups} rollups past retention`);
    return totals;
  }

  function runOnce() {
    running ??= pass().finally(() => (running = null));
    return running;
  }

  const runLogged = () => void runOnce().catch((err) => opts.log?.(`[prune] failed: ${String(err)}`));
  const timer = setInterval(runLogged, opts.everyMs ?? 60 * 60_000);
  timer.unref();
  const first = setTimeout(runLogged, opts.firstRunMs ?? 10 * 60_000);
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
