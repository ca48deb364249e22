import { describe, expect, it } from "vitest";
import { cToF, mean, record, window } from "./helpers";

// Steady hold at the AHRI 550/590 rating conditions (REFERENCES.md §3): 54 → 44 °F at 2.4 gpm/ton,
// 85 °F entering condenser water at 3.0 gpm/ton, design wet bulb 78 °F with a 7 °F tower approach (§5).
const run = record({ scenario: "design-steady", seed: 3, durationS: 2 * 3600, sampleEveryS: 30, keepStates: true });
const from = 3600;
const to = 2 * 3600;
const avgF = (eq: string, q: string) => cToF(mean(window(run.num(eq, q), from, to)));
const avg = (eq: string, q: string) => mean(window(run.num(eq, q), from, to));
const gpm = (lps: number) => lps / 0.0630902;

describe("energy balance (ASHRAE Handbook: Btu/h = 500 × gpm × ΔT, tons = gpm × ΔT / 24)", () => {
  for (const ch of ["CH-1", "CH-2"]) {
    const i = Number(ch.slice(3)) - 1;
    it(`${ch}: evaporator load from its water-side readings matches the model's heat absorbed within 2 %`, () => {
      const flowGpm = gpm(avg(ch, "chilled_water_flow"));
      const dtF = avgF(ch, "chilled_water_entering_temp") - avgF(ch, "chilled_water_leaving_temp");
      const btuh = 500 * flowGpm * dtF;
      const tons = (flowGpm * dtF) / 24;
      const modelKW = mean(run.states.filter((s) => s.tS >= from).map((s) => s.chillers[i].evapKW));
      expect(Math.abs(btuh / (modelKW * 3412.14) - 1)).toBeLessThan(0.02);
      // 1 ton = 12 000 Btu/h = 3.516853 kW (REFERENCES.md §2)
      expect(Math.abs(tons / (modelKW / 3.516853) - 1)).toBeLessThan(0.02);
    });
    it(`${ch}: condenser heat from its readings = evaporator heat + compressor kW within 3 %`, () => {
      const qEvap =
        500 *
        gpm(avg(ch, "chilled_water_flow")) *
        (avgF(ch, "chilled_water_entering_temp") - avgF(ch, "chilled_water_leaving_temp"));
      const qCond =
        500 *
        gpm(avg(ch, "condenser_water_flow")) *
        (avgF(ch, "condenser_water_leaving_temp") - avgF(ch, "condenser_water_entering_temp"));
      const work = avg(ch, "compressor_power") * 3412.14;
      expect(Math.abs(qCond / (qEvap + work) - 1)).toBeLessThan(0.03);
      // and the balance is not trivially met by ignoring work: condenser heat exceeds evaporator heat by > 10 %
      expect(qCond / qEvap).toBeGreaterThan(1.1);
    });
  }
});

describe("design point, steady load (AHRI 550/590 rating conditions, REFERENCES.md §3–§5)", () => {
  it("both chillers staged on, leaving chilled water within ±1 °F of the 44 °F setpoint", () => {
    for (const ch of ["CH-1", "CH-2"]) {
      const lchwt = window(run.num(ch, "chilled_water_leaving_temp"), from, to).map(cToF);
      for (const v of lchwt) expect(Math.abs(v - 44)).toBeLessThan(1);
      const status = run.get(ch, "run_status");
      expect(status.v.filter((_, i) => status.t[i] >= from).every((x) => x === true)).toBe(true);
    }
  });
  it("condenser water entering at the 85 °F rating value (±1 °F) with the tower fan in auto", () => {
    expect(Math.abs(avgF("CH-1", "condenser_water_entering_temp") - 85)).toBeLessThan(1);
  });
  it("tower approach ≈ 7 °F design (typical design 95/85/78 °F, REFERENCES.md §5 — recalled there, not verified) within ±1.5 °F", () => {
    const approach = avgF("CT-1", "condenser_water_leaving_temp") - avgF("WS-1", "outdoor_wet_bulb_temp");
    expect(Math.abs(approach - 7)).toBeLessThan(1.5);
  });
  it("tower range ≈ the rating range 85 → 94.3 °F (9.3 °F) at design flow, within ±1 °F (AHRI 550/590 Table 1, REFERENCES.md §3)", () => {
    const range = avgF("CT-1", "condenser_water_entering_temp") - avgF("CT-1", "condenser_water_leaving_temp");
    expect(Math.abs(range - 9.3)).toBeLessThan(1);
    expect(gpm(avg("CH-1", "condenser_water_flow")) / 400).toBeCloseTo(3.0, 1);
  });
  it("refrigerant approaches 0.5–3 °F at full load (common practice for modern centrifugal chillers)", () => {
    const evapApproach = avgF("CH-1", "chilled_water_leaving_temp") - avgF("CH-1", "evaporator_saturated_temp");
    const condApproach = avgF("CH-1", "condenser_saturated_temp") - avgF("CH-1", "condenser_water_leaving_temp");
    expect(evapApproach).toBeGreaterThan(0.5);
    expect(evapApproach).toBeLessThan(3);
    expect(condApproach).toBeGreaterThan(0.5);
    expect(condApproach).toBeLessThan(3);
  });
  it("full-load kW/ton at or below the ASHRAE 90.1-2019 Path A limit 0.56 (REFERENCES.md §4) and above 0.40 (common practice floor at AHRI conditions)", () => {
    for (const ch of ["CH-1", "CH-2"]) {
      const i = Number(ch.slice(3)) - 1;
      const tons = mean(run.states.filter((s) => s.tS >= from).map((s) => s.chillers[i].evapKW)) / 3.516853;
      const kwPerTon = avg(ch, "compressor_power") / tons;
      expect(tons / 400).toBeGreaterThan(0.9);
      expect(kwPerTon).toBeLessThanOrEqual(0.56);
      expect(kwPerTon).toBeGreaterThan(0.4);
    }
  });
  it("drive temperature in its normal 100–110 °F band (common practice, recalled)", () => {
    for (const v of window(run.num("CH-1", "drive_temp"), from, to).map(cToF)) {
      expect(v).toBeGreaterThan(100);
      expect(v).toBeLessThan(110);
    }
  });
});
