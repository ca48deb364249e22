// Loop crossover: the chilled-water loop warming past the condenser-water loop while a
// chiller sits off. With chilled water warmer than condenser water the refrigerant
// migrates to (and stays in) the condenser, where it no longer cools the compressor's
// motor and drive on restart. These are Liftline's own derived numbers (no published
// standard defines them); the physics is the saturation-pressure ordering of the two shells.

import { fitTrend, projectToValue, windowOf, type TimedValue, type TrendFit } from "./trend";

/** Condenser water minus chilled water, both entering the chiller (K). ≤ 0 means the loops have crossed. */
export function crossoverMarginK(condenserWaterEnteringC: number, chilledWaterEnteringC: number): number {
  return condenserWaterEnteringC - chilledWaterEnteringC;
}

/** Condenser − evaporator refrigerant pressure (kPa); meaningful as a crossover sign while running. */
export function crossoverPressureMarginKPa(condenserPressureKPa: number, evaporatorPressureKPa: number): number {
  return condenserPressureKPa - evaporatorPressureKPa;
}

export interface TimeToCrossoverOptions {
  /** Sliding event-time window the line is fitted over. */
  windowS: number;
  /** Fewest samples and shortest span a fit is trusted with. */
  minSamples: number;
  minSpanS: number;
  /** Slopes gentler than this (K/s, positive number) count as not closing. */
  minClosingRateKPerS: number;
}

export const defaultTimeToCrossoverOptions: TimeToCrossoverOptions = {
  windowS: 600,
  minSamples: 6,
  minSpanS: 120,
  minClosingRateKPerS: 0.05 / 60,
};

export interface TimeToCrossover {
  /** Seconds from `atMs` until the fitted margin reaches zero. */
  timeToCrossoverS: number;
  /** Band from slope ± 2 standard errors. */
  earliestS: number;
  latestS: number;
  /** Closing rate, K per minute (positive = closing). */
  closingRateKPerMin: number;
  /** Fitted margin now, and how far samples scatter around the fit (K). */
  fittedMarginK: number;
  residualStdDevK: number;
  samples: number;
  atMs: number;
}

export type TimeToCrossoverResult =
  | ({ status: "closing" } & TimeToCrossover)
  | { status: "crossed"; fittedMarginK: number; atMs: number }
  | { status: "not_closing"; closingRateKPerMin: number; fittedMarginK: number; atMs: number }
  | { status: "insufficient_data"; samples: number };

/**
 * Fits the margin over the window ending at `nowMs` and projects it to zero —
 * only when it is closing faster than the noise floor.
 */
export function timeToCrossover(
  marginSamples: readonly TimedValue[],
  nowMs: number,
  options: Partial<TimeToCrossoverOptions> = {},
): TimeToCrossoverResult {
  const o = { ...defaultTimeToCrossoverOptions, ...options };
  const win = windowOf(marginSamples, nowMs, o.windowS);
  const fit: TrendFit | null = win.length >= o.minSamples ? fitTrend(win) : null;
  if (!fit || fit.spanS < o.minSpanS) return { status: "insufficient_data", samples: win.length };
  const closingRateKPerMin = -fit.slopePerS * 60;
  // Project from the evaluation time, not the last sample, so a late evaluation counts down.
  const sinceLastS = (nowMs - fit.lastTsMs) / 1000;
  const fittedMarginK = fit.valueAtLast + fit.slopePerS * sinceLastS;
  if (fittedMarginK <= 0) return { status: "crossed", fittedMarginK, atMs: nowMs };
  if (-fit.slopePerS < o.minClosingRateKPerS)
    return { status: "not_closing", closingRateKPerMin, fittedMarginK, atMs: nowMs };
  const p = projectToValue({ ...fit, valueAtLast: fittedMarginK }, 0);
  if (!p) return { status: "not_closing", closingRateKPerMin, fittedMarginK, atMs: nowMs };
  return {
    status: "closing",
    timeToCrossoverS: p.timeS,
    earliestS: p.earliestS,
    latestS: p.latestS,
    closingRateKPerMin,
    fittedMarginK,
    residualStdDevK: fit.residualStdDev,
    samples: fit.n,
    atMs: nowMs,
  };
}

/**
 * Saturated-temperature difference of the two shells from their refrigerant pressures (K): the
 * refrigerant's own reading of the margin, comparable with the water margin and its noise floors.
 */
export function refrigerantMarginK(
  satTempC: (pressureKPa: number) => number,
  condenserPressureKPa: number,
  evaporatorPressureKPa: number,
): number {
  return satTempC(condenserPressureKPa) - satTempC(evaporatorPressureKPa);
}

/**
 * The smallest margin (K) at which the chiller can start: the saturated-temperature rise that gives
 * the record's minimum condenser − evaporator pressure difference above the evaporator's pressure.
 */
export function minStartMarginK(
  satTempC: (pressureKPa: number) => number,
  evaporatorPressureKPa: number,
  minStartLiftKPa: number,
): number {
  return satTempC(evaporatorPressureKPa + minStartLiftKPa) - satTempC(evaporatorPressureKPa);
}
