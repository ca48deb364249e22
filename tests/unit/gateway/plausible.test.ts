import { describe, expect, it } from "vitest";
import type { IngestPoint } from "@/db/queries/gateways";
import { toRow } from "@/gateway/ingest";
import { rejectionReasons } from "@/gateway/contract";
import { isPlausible, plausibleRanges, quantities } from "@/lib/quantities";
import { runScenario } from "@/simulator";
import { scenarioNames } from "@/simulator/scenarios";

const point = (measure: IngestPoint["measure"], unit: IngestPoint["unit"]): IngestPoint => ({
  pointId: 1,
  siteId: "s",
  unit,
  measure,
  states: null,
  expectedIntervalS: 5,
});

describe("plausible ranges at ingestion", () => {
  it("refuses absurd finite numbers as out_of_range, a counted reason of the contract", () => {
    expect(rejectionReasons).toContain("out_of_range");
    // ±1e308 is valid JSON and a finite double: the percentage the contract used to store.
    expect(toRow(point("percent", "%"), 1e308, 0, 0)).toBe("out_of_range");
    expect(toRow(point("percent", "%"), -1e308, 0, 0)).toBe("out_of_range");
    expect(toRow(point("temperature", "degC"), -300, 0, 0)).toBe("out_of_range"); // below absolute zero
    expect(toRow(point("pressure", "kPa"), -5, 0, 0)).toBe("out_of_range"); // absolute pressure < 0
    expect(toRow(point("duration", "s"), -1, 0, 0)).toBe("out_of_range");
    // Overflow on conversion stays wrong_type (not finite), as gateway/PROTOCOL.md says.
    expect(toRow(point("pressure", "psig"), 1.7e308, 0, 0)).toBe("wrong_type");
  });

  it("keeps real readings, judged in canonical units after conversion", () => {
    expect(toRow(point("percent", "%"), 100, 0, 0)).toMatchObject({ value: 100 });
    expect(toRow(point("temperature", "degF"), 44, 0, 0)).toMatchObject({ value: expect.closeTo(6.67, 2) });
    // 350 °F is 176.7 °C: inside; 400 °F (204 °C) is not.
    expect(toRow(point("temperature", "degF"), 350, 0, 0)).not.toBe("out_of_range");
    expect(toRow(point("temperature", "degF"), 400, 0, 0)).toBe("out_of_range");
    // A vacuum gauge reading: −14 psig is 4 kPa absolute.
    expect(toRow(point("pressure", "psig"), -14, 0, 0)).not.toBe("out_of_range");
  });

  it("gives every numeric measure of the vocabulary a range and leaves the others alone", () => {
    const numeric = new Set(Object.values(quantities).map((q) => q.measure));
    for (const m of numeric) if (!["boolean", "state", "text"].includes(m)) expect(plausibleRanges).toHaveProperty(m);
    expect(isPlausible("text", 1e308)).toBe(true);
    expect(isPlausible("percent", Number.NaN)).toBe(false);
  });

  it("never refuses what the simulated plants publish, in any scenario", () => {
    for (const scenario of scenarioNames) {
      let n = 0;
      for (const sample of runScenario({
        scenario,
        seed: 1,
        startMs: Date.UTC(2026, 5, 1),
        durationS: 4 * 3600,
        sampleEveryS: 30,
      })) {
        for (const r of sample.readings) {
          if (typeof r.value !== "number") continue;
          const measure = quantities[r.quantity].measure;
          expect(isPlausible(measure, r.value), `${scenario} ${r.equipment} ${r.quantity} = ${r.value}`).toBe(true);
          n++;
        }
      }
      expect(n).toBeGreaterThan(1000);
    }
  });
});
