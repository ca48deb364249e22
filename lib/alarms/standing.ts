// The alarms as they stood at a moment of a replay: each alarm's state after its last recorded
// transition at or before that moment. Pure, for the replay page.

export interface RecordedTransition {
  alarmKey: string;
  ruleId: string;
  equipment: string;
  priority: number;
  from: string;
  to: string;
  cause: string;
  atMs: number;
}

export interface StandingAlarm {
  alarmKey: string;
  ruleId: string;
  equipment: string;
  priority: number;
  state: string;
  /** Event time of the transition that put it in this state. */
  sinceMs: number;
}

/**
 * Alarms out of normal at `atMs`: `atStart` are the ones standing when the window began,
 * `transitions` the window's, in recorded order. Most urgent first, then the newest.
 */
export function standingAlarms(
  atStart: readonly RecordedTransition[],
  transitions: readonly RecordedTransition[],
  atMs: number,
): StandingAlarm[] {
  const byKey = new Map<string, StandingAlarm>();
  for (const t of [...atStart, ...transitions]) {
    if (t.atMs > atMs) continue;
    byKey.set(t.alarmKey, {
      alarmKey: t.alarmKey,
      ruleId: t.ruleId,
      equipment: t.equipment,
      priority: t.priority,
      state: t.to,
      sinceMs: t.atMs,
    });
  }
  return [...byKey.values()]
    .filter((a) => a.state !== "normal")
    .sort((a, b) => a.priority - b.priority || b.sinceMs - a.sinceMs);
}

/** Event time of the first transition after `atMs`, or null. */
export function nextTransitionAfter(transitions: readonly RecordedTransition[], atMs: number): number | null {
  let best: number | null = null;
  for (const t of transitions) if (t.atMs > atMs && (best === null || t.atMs < best)) best = t.atMs;
  return best;
}
