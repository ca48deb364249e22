// Warnings a technician can trust, on the simulator's scenarios at every site layout, run headless
// through the rules on event time (tests/helpers/rule-replay.ts). Each 24 h day takes a few seconds.
import { describe, expect, it } from "vitest";
import { siteLayouts } from "@/simulator";
import { crossoverLeadMin, raised, replay } from "../../helpers/rule-replay";

const layouts = Object.keys(siteLayouts);

describe("normal-day, 24 h at every site layout: no priority 1 or 2 alarm", () => {
  for (const layout of layouts)
    it(layout, () => {
      const r = replay("normal-day", { layout, durationS: 24 * 3600 });
      expect(raised(r).filter((t) => t.priority <= 2)).toEqual([]);
    });
});

describe("power-blip: the warning leads the crossing and its first advice fits the state", () => {
  for (const layout of layouts)
    it(layout, () => {
      const r = replay("power-blip", { layout, durationS: 75 * 60 });
      const ch1 = r.chillers.get("CH-1")!;
      expect(ch1.crossedAtMs).not.toBeNull();
      expect(crossoverLeadMin(r, "CH-1")).toBeGreaterThanOrEqual(10);
      // The chiller is held by its trip and the restart far off: keep the condenser water up first.
      const first = ch1.firstRaised.get("crossover_risk")!.condition!;
      expect(first.advice[0]).toMatch(/Keep the condenser water up/);
      expect(first.advice.join(" ")).not.toMatch(/back in auto/);
    });
});

describe("slow-crossover: a long lead and no critical alarm while the chiller runs above its minimum", () => {
  for (const layout of ["default", "data-hall", "school"])
    it(layout, () => {
      const r = replay("slow-crossover", { layout, durationS: 9 * 3600 });
      expect(r.chillers.get("CH-1")!.crossedAtMs).not.toBeNull();
      expect(crossoverLeadMin(r, "CH-1")).toBeGreaterThanOrEqual(60);
      expect(r.chillers.get("CH-1")!.criticalWhileRunning).toBe(0);
    });
});
