// When the rules are evaluated, as a function of the readings' event times alone, so the live
// server and a replay of the stored readings evaluate at the same instants whatever the batches
// were: the first reading of each 5-second step of event time (steps counted from the epoch).

/** Evaluate at most once per this much event time: rules look at minutes, not seconds. */
export const EVALUATION_STEP_MS = 5_000;

/** True when a reading at `tsMs` opens a step of event time after the one last evaluated. */
export function isEvaluationDue(lastEvaluatedMs: number, tsMs: number, stepMs = EVALUATION_STEP_MS): boolean {
  return Math.floor(tsMs / stepMs) > Math.floor(lastEvaluatedMs / stepMs);
}

/**
 * The evaluation times that readings at `sortedTsMs` (ascending) call for after `lastEvaluatedMs`:
 * the first reading time of every step of event time they open. Readings older than the last
 * evaluation (late ones) call for none: the live server cannot go back.
 */
export function evaluationTimes(
  lastEvaluatedMs: number,
  sortedTsMs: Iterable<number>,
  stepMs = EVALUATION_STEP_MS,
): number[] {
  const out: number[] = [];
  let last = lastEvaluatedMs;
  for (const ts of sortedTsMs) {
    if (!isEvaluationDue(last, ts, stepMs)) continue;
    out.push(ts);
    last = ts;
  }
  return out;
}
