// The order a site's alarm list reads in: by state, then priority, then the latest change first.
// ISA-18.2 (IEC 62682) asks the display to tell active from returned-to-normal and unacknowledged from
// acknowledged, with what needs the operator first (REFERENCES.md §7); the order here is ours.

import type { AlarmState } from "./states";

/** Display groups: what needs someone first; null for states the active list leaves out. */
export const displayGroup: Record<AlarmState, number | null> = {
  unacknowledged: 0, // active, nobody has taken it
  acknowledged: 1, // active, taken
  latched: 1, // cleared but held until someone resets it: still needs a hand
  returned_unacknowledged: 2, // cleared on its own; only the acknowledgement is left (shown quieter)
  shelved: 3, // hidden on purpose for a while: listed apart
  out_of_service: 3,
  normal: null,
  suppressed_by_design: null,
};

export interface OrderableAlarm {
  state: AlarmState;
  priority: number;
  lastTransitionMs: number | null;
}

/** The alarms the list shows, in reading order (priority 1 is the highest). */
export function orderForDisplay<T extends OrderableAlarm>(alarms: readonly T[]): T[] {
  return alarms
    .filter((a) => displayGroup[a.state] !== null)
    .sort(
      (a, b) =>
        displayGroup[a.state]! - displayGroup[b.state]! ||
        a.priority - b.priority ||
        (b.lastTransitionMs ?? 0) - (a.lastTransitionMs ?? 0),
    );
}

/** Returned to normal and waiting only for acknowledgement, or shelved / out of service: drawn quieter. */
export const isQuiet = (state: AlarmState): boolean => (displayGroup[state] ?? 0) >= 2;

/** The worst alarm still active (unacknowledged, acknowledged or latched), or null. */
export function worstActive<T extends OrderableAlarm>(alarms: readonly T[]): T | null {
  return orderForDisplay(alarms).find((a) => (displayGroup[a.state] ?? 9) <= 1) ?? null;
}
