// The overview's derived readings. The crossover margin is condenser water − chilled water entering
// (DEVELOPERS.md; ≤ 0 means the loops crossed); the AHRI 550/590 rating's running margin is
// 85 °F − 54 °F = 31 °F ≈ 17.2 K (REFERENCES.md §3); a pump proven running without its command is
// in hand at its starter (common practice).
import { describe, expect, it } from "vitest";
import {
  equipmentState,
  formatCountdown,
  lockoutLeftNowS,
  marginGauge,
  MARGIN_SCALE_K,
  soonestCrossover,
} from "@/lib/plant/overview-values";

describe("equipment state words", () => {
  it("a fault wins over running; hand and off modes of a fan drive say so whatever it runs at", () => {
    expect(equipmentState("chiller", { run: true, faults: [false, true] })).toBe("fault");
    expect(equipmentState("tower_fan", { run: true, mode: "hand" })).toBe("hand");
    expect(equipmentState("tower_fan", { run: false, mode: "off" })).toBe("off");
    expect(equipmentState("tower_fan", { run: true, mode: "auto" })).toBe("run");
  });
  it("a pump proven running with its command off is in hand; with no status it is unknown", () => {
    expect(equipmentState("pump", { run: true, command: false })).toBe("hand");
    expect(equipmentState("pump", { run: true, command: true })).toBe("run");
    expect(equipmentState("pump", { run: false, command: true })).toBe("off");
    expect(equipmentState("pump", { run: null })).toBe("unknown");
  });
});

describe("margin bar", () => {
  it("the AHRI rating's running margin (17.2 K) fills a 15 K bar; the minimum sits at its fraction", () => {
    const g = marginGauge((85 - 54) / 1.8, 2);
    expect(g.status).toBe("above_minimum");
    expect(g.fraction).toBe(1);
    expect(g.minFraction).toBeCloseTo(2 / MARGIN_SCALE_K, 9);
  });
  it("below the minimum, at zero (crossed) and unknown", () => {
    expect(marginGauge(1.5, 2).status).toBe("below_minimum");
    expect(marginGauge(0, 2).status).toBe("crossed");
    expect(marginGauge(-1, null).status).toBe("crossed");
    expect(marginGauge(null, 2).status).toBe("unknown");
  });
  it("a large minimum widens the scale to three times it", () => {
    expect(marginGauge(10, 8).scaleK).toBe(24);
  });
});

describe("time to crossover and lockout", () => {
  const closing = (s: number) =>
    ({
      status: "closing",
      timeToCrossoverS: s,
      earliestS: s,
      latestS: s,
      closingRateKPerMin: 1,
      fittedMarginK: 1,
      residualStdDevK: 0,
      samples: 6,
      atMs: 0,
    }) as const;
  it("takes the sooner of the two fits; crossed wins", () => {
    expect(soonestCrossover(closing(900), closing(600))).toEqual({ status: "closing", seconds: 600 });
    expect(soonestCrossover(closing(900), { status: "crossed", fittedMarginK: -1, atMs: 0 })).toEqual({
      status: "crossed",
    });
    expect(soonestCrossover(null, { status: "insufficient_data", samples: 2 })).toEqual({ status: "unknown" });
  });
  it("counts the lockout down from its snapshot and stops at zero", () => {
    const l = { lockoutLeftS: 300, source: "controller" as const };
    expect(lockoutLeftNowS(l, 1_000, 61_000)).toBe(240);
    expect(lockoutLeftNowS(l, 1_000, 1_000_000)).toBe(0);
    expect(lockoutLeftNowS({ lockoutLeftS: 0, source: "unknown" }, 0, 0)).toBeNull();
    expect(formatCountdown(245)).toBe("4:05");
    expect(formatCountdown(3725)).toBe("1:02:05");
  });
});
