// Least-squares straight line through a sliding window of event-time samples, with the
// spread of the fit, so a projection can say how sure it is. Ordinary least squares via
// simple-statistics; slope standard error from the textbook formula
// SE(m) = s / √Σ(t − t̄)², s = √(Σ residual² / (n − 2)).

import { linearRegression } from "simple-statistics";

export interface TimedValue {
  tsMs: number;
  value: number;
}

export interface TrendFit {
  n: number;
  spanS: number;
  /** Units of the value per second. */
  slopePerS: number;
  /** Standard error of the slope, same units. */
  slopeStdErrPerS: number;
  /** Fitted value at the newest sample. */
  valueAtLast: number;
  /** Residual standard deviation: how far samples scatter around the line. */
  residualStdDev: number;
  lastTsMs: number;
}

/** Samples within [nowMs − windowS, nowMs], oldest first. Input must be sorted by time. */
export function windowOf(samples: readonly TimedValue[], nowMs: number, windowS: number): TimedValue[] {
  const fromMs = nowMs - windowS * 1000;
  return samples.filter((s) => s.tsMs >= fromMs && s.tsMs <= nowMs);
}

export function fitTrend(samples: readonly TimedValue[]): TrendFit | null {
  const n = samples.length;
  if (n < 3) return null;
  const t0 = samples[0].tsMs;
  const lastTsMs = samples[n - 1].tsMs;
  // Seconds relative to the first sample keep the regression numerically well conditioned.
  const xy = samples.map((s) => [(s.tsMs - t0) / 1000, s.value]);
  const spanS = xy[n - 1][0];
  if (spanS <= 0) return null;
  const { m, b } = linearRegression(xy);
  const meanX = xy.reduce((a, p) => a + p[0], 0) / n;
  let sxx = 0;
  let sse = 0;
  for (const [x, y] of xy) {
    sxx += (x - meanX) ** 2;
    sse += (y - (m * x + b)) ** 2;
  }
  const residualStdDev = Math.sqrt(sse / (n - 2));
  const slopeStdErrPerS = sxx > 0 ? residualStdDev / Math.sqrt(sxx) : Infinity;
  return { n, spanS, slopePerS: m, slopeStdErrPerS, valueAtLast: m * spanS + b, residualStdDev, lastTsMs };
}

export interface Projection {
  /** Seconds from the newest sample until the fitted line reaches the target. */
  timeS: number;
  /** Earlier and later bounds from slope ± k·SE (later is Infinity when the band includes a flat line). */
  earliestS: number;
  latestS: number;
}

/**
 * When the fitted line heads toward `target` and has not reached it, how long until it does.
 * Null when the line moves away from the target (or is flat) — nothing to project.
 */
export function projectToValue(fit: TrendFit, target: number, k = 2): Projection | null {
  const gap = target - fit.valueAtLast;
  if (gap === 0) return { timeS: 0, earliestS: 0, latestS: 0 };
  const towards = Math.sign(gap) === Math.sign(fit.slopePerS) && fit.slopePerS !== 0;
  if (!towards) return null;
  const speed = Math.abs(fit.slopePerS);
  const dist = Math.abs(gap);
  const fast = speed + k * fit.slopeStdErrPerS;
  const slow = speed - k * fit.slopeStdErrPerS;
  return { timeS: dist / speed, earliestS: dist / fast, latestS: slow > 0 ? dist / slow : Infinity };
}
