// Warnings a technician can trust, on the simulator's incident scenarios at every site layout, run
// headless through the rules on event time (tests/helpers/rule-replay.ts).
import { describe, expect, it } from "vitest";
import { siteLayouts } from "@/simulator";
import { crossoverLeadMin, replay } from "../../helpers/rule-replay";

const layouts = Object.keys(siteLayouts);

describe("power-blip: the warning leads the crossing and its first advice fits the state", () => {
  // The scenario's late reset comes at 170 min; with a realistic loop volume the loops cross 110–145 min in.
  for (const layout of layouts)
    it(layout, { timeout: 30_000 }, () => {
      const r = replay("power-blip", { layout, durationS: 165 * 60 });
      const ch1 = r.chillers.get("CH-1")!;
      expect(ch1.crossedAtMs).not.toBeNull();
      expect(crossoverLeadMin(r, "CH-1")).toBeGreaterThanOrEqual(10);
      // Held by its latched high-pressure trip, the restart is far off: keep the condenser water up first,
      // since a fan only cools it toward the chilled water while the chiller cannot run.
      const first = ch1.firstRaised.get("crossover_risk")!.condition!;
      expect(first.advice[0]).toMatch(/Keep the condenser water up/);
      expect(first.advice.join(" ")).not.toMatch(/restore the tower fan|back in auto/i);
    });
});

describe("slow-crossover: a long lead and no critical alarm while the chiller runs above its minimum", () => {
  for (const layout of layouts)
    it(layout, { timeout: 30_000 }, () => {
      const r = replay("slow-crossover", { layout, durationS: 9 * 3600 });
      const ch1 = r.chillers.get("CH-1")!;
      // The loops cross at the default layout (otherwise the lead check proves nothing); a smaller plant may not.
      if (layout === "default") expect(ch1.crossedAtMs).not.toBeNull();
      if (ch1.crossedAtMs !== null) expect(crossoverLeadMin(r, "CH-1")).toBeGreaterThanOrEqual(60);
      expect(ch1.criticalWhileRunning).toBe(0);
    });
});
