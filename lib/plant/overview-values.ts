// What the plant overview shows beside the drawing's boxes, derived from latest values and the site
// snapshot: each piece of equipment's state in words (never colour alone, ISA-101), the crossover
// margin as a bar against the chiller's minimum, the restart lockout counting down, and the sooner
// of the two time-to-crossover projections. Pure.

import type { TimeToCrossoverResult } from "./crossover";
import type { LockoutLeft } from "./lockout";

export type RunState = "run" | "off" | "fault" | "hand" | "unknown";

export interface StateInputs {
  run?: boolean | null;
  faults?: ReadonlyArray<boolean | null | undefined>;
  /** Pumps: the start/stop command. */
  command?: boolean | null;
  /** Tower fans: the drive's hand-off-auto mode. */
  mode?: string | null;
}

/**
 * One state per box. A fault wins; a fan drive in hand or off says so whatever it runs at; a pump
 * proven running while its command is off is running in hand at its starter (common practice).
 */
export function equipmentState(kind: "chiller" | "tower_fan" | "pump", v: StateInputs): RunState {
  if (v.faults?.some((f) => f === true)) return "fault";
  if (kind === "tower_fan" && v.mode === "hand") return "hand";
  if (kind === "tower_fan" && v.mode === "off") return "off";
  if (kind === "pump" && v.run === true && v.command === false) return "hand";
  if (v.run === true) return "run";
  if (v.run === false) return "off";
  return "unknown";
}

export const runStateWord: Record<RunState, string> = {
  run: "RUN",
  off: "OFF",
  fault: "FAULT",
  hand: "HAND",
  unknown: "NO DATA",
};

export interface MarginGauge {
  status: "crossed" | "below_minimum" | "above_minimum" | "unknown";
  /** Where the margin and the minimum sit on the bar, 0…1. */
  fraction: number;
  minFraction: number;
  scaleK: number;
}

/** The bar's full scale: at least 15 K (near the AHRI rating's 17 K running margin, 85 °F − 54 °F), else 3 × the minimum. */
export const MARGIN_SCALE_K = 15;

/**
 * The crossover margin (condenser water − chilled water entering, K) against the smallest margin the
 * chiller can start with (`minK`, from its record; 0 when unknown: the loops crossing).
 */
export function marginGauge(marginK: number | null, minK: number | null): MarginGauge {
  const min = Math.max(0, minK ?? 0);
  const scaleK = Math.max(MARGIN_SCALE_K, 3 * min);
  const clamp = (x: number) => Math.min(1, Math.max(0, x));
  if (marginK === null || !Number.isFinite(marginK))
    return { status: "unknown", fraction: 0, minFraction: clamp(min / scaleK), scaleK };
  const status = marginK <= 0 ? "crossed" : marginK < min ? "below_minimum" : "above_minimum";
  return { status, fraction: clamp(marginK / scaleK), minFraction: clamp(min / scaleK), scaleK };
}

export type CrossoverOutlook =
  { status: "closing"; seconds: number } | { status: "crossed" } | { status: "not_closing" } | { status: "unknown" };

/** The short fit follows a trip, the long one a slow drift: the sooner of the two. */
export function soonestCrossover(
  fast: TimeToCrossoverResult | null | undefined,
  slow: TimeToCrossoverResult | null | undefined,
): CrossoverOutlook {
  const fits = [fast, slow].filter((f): f is TimeToCrossoverResult => !!f);
  if (fits.some((f) => f.status === "crossed")) return { status: "crossed" };
  const closing = fits.flatMap((f) => (f.status === "closing" ? [f.timeToCrossoverS] : []));
  if (closing.length) return { status: "closing", seconds: Math.min(...closing) };
  if (fits.some((f) => f.status === "not_closing")) return { status: "not_closing" };
  return { status: "unknown" };
}

/**
 * The lockout left now, counted down from the snapshot's figure as of `asOfMs` (the moment it was
 * received); null when no timer or countdown is known.
 */
export function lockoutLeftNowS(lockout: LockoutLeft | null | undefined, asOfMs: number, nowMs: number): number | null {
  if (!lockout || lockout.source === "unknown") return null;
  return Math.max(0, lockout.lockoutLeftS - Math.max(0, nowMs - asOfMs) / 1000);
}

/** "4:05" for a lockout countdown (minutes:seconds), "1:02:05" past an hour. */
export function formatCountdown(seconds: number): string {
  const s = Math.max(0, Math.ceil(seconds));
  const h = Math.floor(s / 3600);
  const m = Math.floor((s % 3600) / 60);
  const sec = String(s % 60).padStart(2, "0");
  return h ? `${h}:${String(m).padStart(2, "0")}:${sec}` : `${m}:${sec}`;
}
