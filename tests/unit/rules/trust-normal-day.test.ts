// Issue figures on event time: a normal summer day at every site layout pages no one. Each 24 h
// day runs headless through the rules (tests/helpers/rule-replay.ts) in a few seconds.
import { describe, expect, it } from "vitest";
import { siteLayouts } from "@/simulator";
import { raised, replay } from "../../helpers/rule-replay";

describe("normal-day, 24 h at every site layout: no priority 1 or 2 alarm", () => {
  for (const layout of Object.keys(siteLayouts))
    it(layout, { timeout: 60_000 }, () => {
      const r = replay("normal-day", { layout, durationS: 24 * 3600 });
      expect(raised(r).filter((t) => t.priority <= 2)).toEqual([]);
      // Far faster than real time (the scenario test's bound): 24 h in well under 24 min.
      expect(r.wallMs).toBeLessThan((24 * 3600 * 1000) / 60);
    });
});
