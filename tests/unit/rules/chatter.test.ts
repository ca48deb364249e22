// A noisy signal hovering at its limit raises at most one alarm: dead band plus on/off delay
// (ISA-18.2 alarm attributes; starting values REFERENCES.md §7 [M]). Each case also runs with
// dead band and delays set to zero to show the same signal would chatter without them.
import { describe, expect, it } from "vitest";
import { saturationPressureKPa } from "@/lib/refrigerant";
import { runFrames, type Frame } from "./synthetic";

/** Deterministic noise in [−1, 1], a new value every sample. */
function noise(i: number): number {
  const x = Math.sin(i * 12.9898 + 78.233) * 43758.5453;
  return 2 * (x - Math.floor(x)) - 1;
}

describe("no chatter at a limit", () => {
  const loopsAtZero = (tS: number): Partial<Frame> => ({
    running: false,
    chwInC: 20 + 0.4 * noise(tS / 10),
    chwOutC: 20,
    cwInC: 20,
    cwOutC: 20,
    // Each idle shell at its water's saturation pressure (R-134a): the shells read the same hover.
    evapKPa: saturationPressureKPa("R-134a", 20 + 0.4 * noise(tS / 10)),
    condKPa: saturationPressureKPa("R-134a", 20),
  });

  it("loops crossed: margin hovering at 0 ± 0.4 K for an hour", () => {
    const r = runFrames({ durationS: 3600, frame: loopsAtZero });
    expect(r.activations("loops_crossed:CH-1")).toBeLessThanOrEqual(1);
    const bare = runFrames({
      durationS: 3600,
      frame: loopsAtZero,
      settings: { loopsCrossed: { deadBandK: 0, onDelayS: 0, offDelayS: 0 } },
    });
    expect(bare.activations("loops_crossed:CH-1")).toBeGreaterThan(5);
  });

  const fanAtLimit = (tS: number): Partial<Frame> => ({
    towerMode: "off",
    fanRunning: false,
    fanSpeedPct: 0,
    cwInC: 29.4 + 0.5 + 0.3 * noise(tS / 10),
  });

  it("tower fan: condenser water hovering at setpoint + 0.5 K ± 0.3 K with the drive in off", () => {
    const r = runFrames({ durationS: 3600, frame: fanAtLimit });
    expect(r.activations("tower_fan_not_running:CT-1")).toBeLessThanOrEqual(1);
    const bare = runFrames({
      durationS: 3600,
      frame: fanAtLimit,
      settings: { towerFan: { deadBandK: 0, onDelayS: 0, offDelayS: 0 } },
    });
    expect(bare.activations("tower_fan_not_running:CT-1")).toBeGreaterThan(5);
  });

  const lowEvapAtLimit = (tS: number): Partial<Frame> => ({ evapSatC: 1.1 + 0.3 * noise(tS / 10) });

  it("low evaporator pressure: saturated temperature hovering at the 1.1 °C limit ± 0.3 K", () => {
    const r = runFrames({ durationS: 3600, frame: lowEvapAtLimit });
    expect(r.activations("low_evaporator_pressure:CH-1")).toBeLessThanOrEqual(1);
    const bare = runFrames({
      durationS: 3600,
      frame: lowEvapAtLimit,
      settings: { lowEvaporatorPressure: { deadBandK: 0, onDelayS: 0, offDelayS: 0 } },
    });
    expect(bare.activations("low_evaporator_pressure:CH-1")).toBeGreaterThan(5);
  });
});

describe("head pressure held at the warning's edge (ISA-18.2 dead band on the projected-time warning)", () => {
  // Rises 10 kPa/min from 950 kPa (warned ≈ 10 min before the 1204.5 kPa cut-out), then the controller holds
  // it near 1145 kPa, creeping 0–1 kPa/min with ± 3 kPa noise — the projection drifts past 10 min and back.
  const heldAtEdge = (tS: number): Partial<Frame> => ({
    condKPa:
      tS < 1170
        ? 950 + (10 / 60) * tS
        : 1145 + (0.5 / 60) * (tS - 1170) * (1 + Math.sin((tS - 1170) / 300)) + 3 * noise(tS / 10),
  });

  it("raises once and stays up through the hold", () => {
    const r = runFrames({ durationS: 3600, frame: heldAtEdge });
    expect(r.activations("head_pressure_near_trip:CH-1")).toBe(1);
  });

  it("clears once the pressure clearly falls", () => {
    const r = runFrames({
      durationS: 2400,
      frame: (tS) => (tS < 1500 ? heldAtEdge(tS) : { condKPa: 1145 - (5 / 60) * (tS - 1500) }),
      keep: true,
    });
    const last = r.evaluations.at(-1)!.conditions.find((c) => c.ruleId === "head_pressure_near_trip")!;
    expect(last.active).toBe(false);
  });
});
