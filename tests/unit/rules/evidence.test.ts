// The readings an alarm page shows for each rule: every rule has its list, the inputs a rule rests on
// (those a failed sensor suppresses it for) are among them, and a chiller's condenser water is found
// on the tower serving it when the chiller has no sensor of its own.
import { describe, expect, it } from "vitest";
import { ruleIds } from "@/lib/rules/condition";
import { evidenceOf, evidencePoints } from "@/lib/rules/evidence";
import { restsOn } from "@/lib/rules/plausibility";
import type { Site } from "@/lib/plant";

describe("alarm evidence", () => {
  it("lists, for every rule, the readings it rests on", () => {
    for (const id of ruleIds) {
      expect(evidenceOf[id], id).toBeDefined();
      // The inputs a failed sensor suppresses the rule for are shown; the condenser water leaving (the
      // tower's, standing in for the chiller's entering water) is found through the tower.
      const shown = new Set(evidenceOf[id]);
      const rests = (restsOn[id] ?? []).filter((q) => q !== "condenser_water_leaving_temp");
      expect(
        rests.filter((q) => !shown.has(q)),
        id,
      ).toEqual([]);
    }
  });

  it("takes a chiller's condenser water from the tower serving it when the chiller has no sensor", () => {
    const site: Site = [
      { tag: "CH-1", kind: "chiller" },
      { tag: "CT-1", kind: "cooling_tower", serves: "CH-1" },
    ];
    const points = new Set(["CH-1|chilled_water_entering_temp", "CT-1|condenser_water_leaving_temp"]);
    const found = evidencePoints(site, "crossover_risk", "CH-1", (tag, q) => points.has(`${tag}|${q}`));
    expect(found).toEqual([
      { tag: "CH-1", quantity: "chilled_water_entering_temp" },
      { tag: "CT-1", quantity: "condenser_water_leaving_temp" },
    ]);
    // With its own sensor the chiller's reading wins.
    points.add("CH-1|condenser_water_entering_temp");
    expect(evidencePoints(site, "crossover_risk", "CH-1", (tag, q) => points.has(`${tag}|${q}`))[1]).toEqual({
      tag: "CH-1",
      quantity: "condenser_water_entering_temp",
    });
  });

  it("an unknown rule id shows nothing rather than failing", () => {
    expect(evidencePoints([], "retired_rule", "CH-1", () => true)).toEqual([]);
  });
});
