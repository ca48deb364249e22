// One piece of equipment's history on one timeline: alarms, the controller's faults and state
// changes, run periods, visits, temporary changes and refrigerant entries, merged in time order.

export const historyKinds = ["alarm", "fault", "run", "visit", "change", "refrigerant"] as const;
export type HistoryKind = (typeof historyKinds)[number];

export const historyKindLabels: Record<HistoryKind, string> = {
  alarm: "Alarms",
  fault: "Controller faults and states",
  run: "Starts and stops",
  visit: "Visits",
  change: "Temporary changes",
  refrigerant: "Refrigerant",
};

export interface HistoryEvent {
  atMs: number;
  kind: HistoryKind;
  title: string;
  detail?: string;
  /** A page with more (the alarm, the visit, the refrigerant log). */
  href?: string;
}

/** A run-status sample: event time and whether the equipment was running. */
export interface RunSample {
  ts: number;
  on: boolean;
}

export interface RunTotals {
  /** Hours running inside the window, counting a sample's state until the next sample. */
  runHours: number;
  /** Off → on transitions inside the window (a window that opens running does not count a start). */
  starts: number;
  /** Each start and stop inside the window. */
  transitions: RunSample[];
}

/**
 * Run hours and starts from run-status samples, as a controller's counters would count them: the
 * state holds from one sample to the next (step interpolation), and the last state holds to `toMs`.
 * `before` is the last sample before the window, so a window that opens running counts from its start.
 */
export function runTotals(samples: readonly RunSample[], fromMs: number, toMs: number, before?: RunSample): RunTotals {
  let runMs = 0;
  let starts = 0;
  const transitions: RunSample[] = [];
  let state = before?.on ?? null;
  let since = fromMs;
  for (const s of samples) {
    if (s.ts < fromMs || s.ts > toMs) continue;
    if (state === true) runMs += s.ts - since;
    // With no state known yet, a first sample that reads running is not a start we saw.
    if (state !== null && s.on !== state) {
      transitions.push(s);
      if (s.on) starts++;
    }
    state = s.on;
    since = s.ts;
  }
  if (state === true) runMs += Math.max(0, toMs - since);
  return { runHours: runMs / 3_600_000, starts, transitions };
}

/** Keeps the first sample and every sample whose value differs from the one before it. */
export function changesOnly<T>(samples: readonly T[], valueOf: (s: T) => unknown): T[] {
  const out: T[] = [];
  let prev: unknown = Symbol("none");
  for (const s of samples) {
    const v = valueOf(s);
    if (v !== prev) out.push(s);
    prev = v;
  }
  return out;
}

/** Newest first, limited to the kinds asked for (all when none). */
export function mergeHistory(events: readonly HistoryEvent[], kinds: readonly HistoryKind[] = []): HistoryEvent[] {
  const wanted = kinds.length ? new Set(kinds) : null;
  return events.filter((e) => !wanted || wanted.has(e.kind)).sort((a, b) => b.atMs - a.atMs);
}
