// Time to crossover: least-squares fit (simple-statistics) of the margin over a sliding window.
import { describe, expect, it } from "vitest";
import { fitTrend, timeToCrossover, type TimedValue } from "@/lib/plant";

const T0 = Date.UTC(2025, 6, 1, 14, 0, 0);

/** margin(t) = start + rate·t, sampled every stepS for durationS. */
function linear(
  startK: number,
  rateKPerMin: number,
  durationS: number,
  stepS = 10,
  noise: (i: number) => number = () => 0,
): TimedValue[] {
  const out: TimedValue[] = [];
  for (let i = 0; i * stepS <= durationS; i++)
    out.push({ tsMs: T0 + i * stepS * 1000, value: startK + (rateKPerMin / 60) * i * stepS + noise(i) });
  return out;
}

describe("time to crossover", () => {
  it("a linear closing margin projects to the right time: 10 K closing 0.5 K/min, after 5 min → 7.5 K left → 15 min", () => {
    const s = linear(10, -0.5, 300);
    const r = timeToCrossover(s, T0 + 300_000, { windowS: 600 });
    expect(r.status).toBe("closing");
    if (r.status !== "closing") return;
    expect(r.fittedMarginK).toBeCloseTo(7.5, 6);
    expect(r.timeToCrossoverS).toBeCloseTo(900, 3);
    expect(r.closingRateKPerMin).toBeCloseTo(0.5, 6);
    expect(r.residualStdDevK).toBeCloseTo(0, 6);
    // Noise-free: the band collapses onto the estimate.
    expect(r.earliestS).toBeCloseTo(900, 3);
    expect(r.latestS).toBeCloseTo(900, 3);
  });

  it("counts down between samples: evaluated 60 s after the last sample the projection is 60 s shorter", () => {
    const s = linear(10, -0.5, 300);
    const r = timeToCrossover(s, T0 + 360_000, { windowS: 600 });
    expect(r.status === "closing" && r.timeToCrossoverS).toBeCloseTo(840, 3);
  });

  it("uses only the sliding window: an earlier flat stretch does not dilute the slope", () => {
    const flat = linear(10, 0, 1200).map((p) => ({ ...p }));
    const closing = linear(10, -1, 300).map((p) => ({ tsMs: p.tsMs + 1_210_000, value: p.value }));
    const r = timeToCrossover([...flat, ...closing], T0 + 1_510_000, { windowS: 300 });
    expect(r.status).toBe("closing");
    if (r.status === "closing") expect(r.closingRateKPerMin).toBeCloseTo(1, 1);
  });

  it("an opening margin gives no projection", () => {
    const r = timeToCrossover(linear(5, 0.3, 300), T0 + 300_000);
    expect(r.status).toBe("not_closing");
  });

  it("a steady margin with sensor noise gives no projection", () => {
    const r = timeToCrossover(
      linear(8, 0, 600, 10, (i) => (i % 2 ? 0.05 : -0.05)),
      T0 + 600_000,
    );
    expect(r.status).toBe("not_closing");
  });

  it("noise gives a spread: band around the estimate and a residual of about the noise amplitude", () => {
    // Deterministic pseudo-noise ±0.3 K.
    const noise = (i: number) => 0.3 * Math.sin(i * 2.7) * Math.cos(i * 1.3);
    const r = timeToCrossover(linear(10, -0.5, 300, 5, noise), T0 + 300_000, { windowS: 600 });
    expect(r.status).toBe("closing");
    if (r.status !== "closing") return;
    expect(r.residualStdDevK).toBeGreaterThan(0.05);
    expect(r.earliestS).toBeLessThan(r.timeToCrossoverS);
    expect(r.latestS).toBeGreaterThan(r.timeToCrossoverS);
    expect(r.timeToCrossoverS).toBeGreaterThan(800);
    expect(r.timeToCrossoverS).toBeLessThan(1000);
  });

  it("too few samples or too short a span are not trusted", () => {
    expect(timeToCrossover(linear(10, -0.5, 30), T0 + 30_000).status).toBe("insufficient_data");
  });

  it("a margin already at or below zero reports crossed", () => {
    const r = timeToCrossover(linear(1, -1, 300), T0 + 300_000);
    expect(r.status).toBe("crossed");
  });

  it("fitTrend slope and its standard error follow OLS (textbook check: y = 2x + 1 exactly)", () => {
    const f = fitTrend([0, 1, 2, 3, 4].map((x) => ({ tsMs: x * 1000, value: 2 * x + 1 })))!;
    expect(f.slopePerS).toBeCloseTo(2, 12);
    expect(f.valueAtLast).toBeCloseTo(9, 12);
    expect(f.slopeStdErrPerS).toBeCloseTo(0, 12);
  });
});
