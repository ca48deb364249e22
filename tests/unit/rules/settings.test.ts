import { describe, expect, it } from "vitest";
import { defaultRuleSettings, parseRuleSettings } from "@/lib/rules";
import { withoutMovedLimits } from "@/lib/rules/settings";
import { chillerLimitDefaults } from "@/lib/plant/equipment-limits";

describe("rule settings", () => {
  it("fills every default from an empty object", () => {
    expect(parseRuleSettings({})).toEqual(defaultRuleSettings);
    expect(defaultRuleSettings.crossoverRisk.warnTimeToCrossoverS).toBe(1800);
  });

  it("an R-134a chiller's default high-pressure cut-out is 160 psig, now from the equipment record, not the settings", () => {
    // 160 psig = 160 × 6.894757 + 101.325 kPa abs (REFERENCES.md conventions; the 160 psig setting is recalled).
    expect(chillerLimitDefaults("R-134a", null).highCondPressureCutoutKPa.value).toBeCloseTo(
      160 * 6.894757 + 101.325,
      0,
    );
    expect("tripKPa" in defaultRuleSettings.headPressure).toBe(false);
    expect("tripC" in defaultRuleSettings.driveTemperature).toBe(false);
  });

  it("stored overrides that still hold the moved limits load, without them", () => {
    const stored = {
      headPressure: { tripKPa: 1100, tripKPaByTag: { "CH-1": 1000 }, warnWithinKPa: 120 },
      driveTemperature: { tripC: 60, tripCByTag: {} },
      timers: { fallbackStartToStartS: 600 },
    };
    expect(() => parseRuleSettings(stored)).toThrow();
    const s = parseRuleSettings(withoutMovedLimits(stored));
    expect(s.headPressure.warnWithinKPa).toBe(120);
    expect(s.driveTemperature).toEqual(defaultRuleSettings.driveTemperature);
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
    expect(() => parseRuleSettings({ headPressure: { warnWithinKPa: "high" } })).toThrow();
  });
});
