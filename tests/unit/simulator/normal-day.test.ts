import { describe, expect, it } from "vitest";
import { cToF, record, window } from "./helpers";

const run = record({ scenario: "normal-day", seed: 11, durationS: 24 * 3600, stepS: 2, sampleEveryS: 60 });

describe("normal-day (full day, load follows occupancy)", () => {
  it("no faults, alarms or refused actions all day", () => {
    expect(run.events.filter((e) => e.kind === "fault" || e.kind === "alarm" || e.kind === "action-refused")).toEqual(
      [],
    );
  });
  it("leaving chilled water within ±1 °F of setpoint through the occupied afternoon while the chillers run (steady load)", () => {
    for (const ch of ["CH-1", "CH-2"]) {
      const status = run.get(ch, "run_status");
      const run1 = status.v.filter((_, i) => status.t[i] >= 10 * 3600 && status.t[i] <= 17 * 3600);
      const l = window(run.num(ch, "chilled_water_leaving_temp"), 10 * 3600, 17 * 3600).map(cToF);
      l.forEach((v, i) => {
        if (run1[i]) expect(Math.abs(v - 44)).toBeLessThan(1);
      });
    }
  });
  it("load follows occupancy: a second chiller stages on in the day and off at night (common practice staging)", () => {
    const ch2 = run.get("CH-2", "run_status");
    const at = (h: number) => ch2.v[ch2.t.findIndex((t) => t >= h * 3600)];
    expect(at(13)).toBe(true);
    expect(at(3)).toBe(false);
  });
  it("never inverts: condenser water stays above chilled water entering at the running chiller", () => {
    const cw = run.num("CH-1", "condenser_water_entering_temp").v;
    const chw = run.num("CH-1", "chilled_water_entering_temp").v;
    cw.forEach((v, i) => expect(v - chw[i]).toBeGreaterThan(5));
  });
});

describe("normal-day on every demo site, coarse 10 s steps", () => {
  for (const site of ["medical-office", "data-hall", "school"] as const) {
    it(`${site}: no faults or alarms all day`, async () => {
      const { siteLayouts } = await import("@/simulator");
      const r = record({
        scenario: "normal-day",
        seed: 2,
        durationS: 24 * 3600,
        stepS: 10,
        sampleEveryS: 600,
        layout: siteLayouts[site],
      });
      expect(r.events.filter((e) => e.kind === "fault" || e.kind === "alarm")).toEqual([]);
    });
  }
});
