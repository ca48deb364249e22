// Restart lockout (anti-recycle) time left. Chiller controllers hold a compressor off for a
// start-to-start and a stop-to-start interval to limit motor/drive starts per hour
// (common practice; the intervals are the manufacturer's settings, read from the controller).

export interface LockoutInputs {
  nowMs: number;
  /** The controller's own countdown, when it reports one, with the time it was read. */
  inhibitLeftS?: { value: number; tsMs: number } | null;
  lastStartMs?: number | null;
  lastStopMs?: number | null;
  startToStartS?: number | null;
  stopToStartS?: number | null;
}

export interface LockoutLeft {
  lockoutLeftS: number;
  source: "controller" | "timers" | "unknown";
}

/** Seconds until the anti-recycle timers allow a start. Prefers the controller's countdown. */
export function restartLockoutLeft(i: LockoutInputs): LockoutLeft {
  if (i.inhibitLeftS && Number.isFinite(i.inhibitLeftS.value)) {
    // The point was true when read; it has counted down since.
    const elapsedS = Math.max(0, (i.nowMs - i.inhibitLeftS.tsMs) / 1000);
    return { lockoutLeftS: Math.max(0, i.inhibitLeftS.value - elapsedS), source: "controller" };
  }
  const candidates: number[] = [];
  if (i.lastStartMs != null && i.startToStartS != null)
    candidates.push(i.lastStartMs + i.startToStartS * 1000 - i.nowMs);
  if (i.lastStopMs != null && i.stopToStartS != null) candidates.push(i.lastStopMs + i.stopToStartS * 1000 - i.nowMs);
  if (candidates.length === 0) return { lockoutLeftS: 0, source: "unknown" };
  return { lockoutLeftS: Math.max(0, ...candidates) / 1000, source: "timers" };
}
