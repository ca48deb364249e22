import { describe, expect, it } from "vitest";
import { cToF, mean, record } from "./helpers";

const run = record({ scenario: "fouled-condenser", seed: 4, durationS: 21 * 86400, stepS: 10, sampleEveryS: 1800 });

/** Mean condenser approach (saturated condensing − leaving condenser water, °F) over the 12:00–16:00 samples of a day. */
function afternoonApproach(ch: string, day: number): number {
  const sat = run.num(ch, "condenser_saturated_temp");
  const lcwt = run.num(ch, "condenser_water_leaving_temp");
  const xs: number[] = [];
  sat.t.forEach((t, i) => {
    const h = (t - day * 86400) / 3600;
    if (h >= 12 && h <= 16) xs.push(cToF(sat.v[i]) - cToF(lcwt.v[i]));
  });
  return mean(xs);
}

describe("fouled-condenser (condenser tube fouling raises the approach over weeks)", () => {
  it("CH-1's afternoon condenser approach grows by more than 3 °F from day 1 to day 21; clean CH-2 stays within 0.5 °F", () => {
    expect(afternoonApproach("CH-1", 20) - afternoonApproach("CH-1", 0)).toBeGreaterThan(3);
    expect(Math.abs(afternoonApproach("CH-2", 20) - afternoonApproach("CH-2", 0))).toBeLessThan(0.5);
  });
  it("CH-1 draws more power than clean CH-2 at the same load by the third week", () => {
    const kw1 = run.num("CH-1", "compressor_power");
    const kw2 = run.num("CH-2", "compressor_power");
    const idx = kw1.t
      .map((t, i) => [t, i])
      .filter(([t]) => t > 20 * 86400 + 12 * 3600 && t < 20 * 86400 + 16 * 3600)
      .map(([, i]) => i);
    expect(mean(idx.map((i) => kw1.v[i])) / mean(idx.map((i) => kw2.v[i]))).toBeGreaterThan(1.05);
  });
});
