import { describe, expect, it } from "vitest";
import { cToF, record } from "./helpers";

const run = record({ scenario: "slow-crossover", seed: 5, durationS: 10 * 3600, stepS: 2, sampleEveryS: 60 });

describe("slow-crossover (cold day, low load, tower over-cooling)", () => {
  it("condenser water drifts down to and below the chilled water entering the running chiller", () => {
    const cw = run.num("CH-1", "condenser_water_entering_temp").v.map(cToF);
    const chw = run.num("CH-1", "chilled_water_entering_temp").v.map(cToF);
    const margin = cw.map((v, i) => v - chw[i]);
    expect(margin[0]).toBeGreaterThan(10); // starts well apart
    expect(Math.min(...margin)).toBeLessThanOrEqual(0); // reaches crossover
  });
  it("with no fault or trip along the way: only the low-lift safety stops the chiller, and it restarts on its own", () => {
    const problems = run.events.filter((e) => e.kind === "fault" || e.kind === "alarm");
    expect(problems.length).toBeGreaterThan(0);
    for (const e of problems) expect(e.message).toMatch(/^Low lift/);
    const status = run.get("CH-1", "run_status").v;
    expect(status.slice(0, 60).every((v) => v === true)).toBe(true); // a healthy first hour
    expect(status.at(-1) === true || status.some((v, i) => i > 0 && v === true && status[i - 1] === false)).toBe(true);
  });
  it("the refrigerant pressure difference that feeds motor/drive cooling shrinks below 10 psid", () => {
    const cond = run.num("CH-1", "condenser_refrigerant_pressure").v;
    const evap = run.num("CH-1", "evaporator_refrigerant_pressure").v;
    const dpPsi = cond.map((c, i) => (c - evap[i]) / 6.894757);
    expect(dpPsi[0]).toBeGreaterThan(20);
    expect(Math.min(...dpPsi)).toBeLessThan(10);
  });
});
