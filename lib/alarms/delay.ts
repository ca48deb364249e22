// On-delay and off-delay (ISA-18.2 alarm attributes): a condition must hold for the delay
// before the alarm follows it, so a signal flickering across its limit does not chatter.
// Starting values: REFERENCES.md §7 [M] (temperature 60 s, pressure 15 s, flow 15 s).

export interface DelaySettings {
  onDelayS: number;
  offDelayS: number;
}

export interface DelayState {
  /** What the alarm currently shows. */
  active: boolean;
  /** The raw condition and since when it has held. */
  rawActive: boolean;
  rawSinceMs: number;
}

export function stepDelay(
  prev: DelayState | undefined,
  rawActive: boolean,
  atMs: number,
  d: DelaySettings,
): DelayState {
  const state: DelayState =
    prev === undefined
      ? { active: false, rawActive, rawSinceMs: atMs }
      : prev.rawActive === rawActive
        ? prev
        : { ...prev, rawActive, rawSinceMs: atMs };
  if (state.active === rawActive) return state;
  const heldS = (atMs - state.rawSinceMs) / 1000;
  const needS = rawActive ? d.onDelayS : d.offDelayS;
  return heldS >= needS ? { ...state, active: rawActive } : state;
}
