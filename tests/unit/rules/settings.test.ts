import { describe, expect, it } from "vitest";
import { defaultRuleSettings, parseRuleSettings } from "@/lib/rules";

describe("rule settings", () => {
  it("fills every default from an empty object", () => {
    expect(parseRuleSettings({})).toEqual(defaultRuleSettings);
    expect(defaultRuleSettings.crossoverRisk.warnTimeToCrossoverS).toBe(1800);
    // 160 psig = 160 × 6.894757 + 101.325 kPa abs (REFERENCES.md conventions).
    expect(defaultRuleSettings.headPressure.tripKPa).toBeCloseTo(160 * 6.894757 + 101.325, 0);
  });

  it("keeps other defaults when one value is overridden", () => {
    const s = parseRuleSettings({ crossoverRisk: { warnTimeToCrossoverS: 900 } });
    expect(s.crossoverRisk.warnTimeToCrossoverS).toBe(900);
    expect(s.crossoverRisk.fitWindowS).toBe(600);
    expect(s.restartRace).toEqual(defaultRuleSettings.restartRace);
  });

  it("refuses invalid values", () => {
    expect(() => parseRuleSettings({ crossoverRisk: { priority: 5 } })).toThrow();
    expect(() => parseRuleSettings({ towerFan: { onDelayS: -1 } })).toThrow();
    expect(() => parseRuleSettings({ headPressure: { tripKPa: "high" } })).toThrow();
  });
});
