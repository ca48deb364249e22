import { describe, expect, it } from "vitest";
import type { ReadingValue } from "@/lib/plant/site";
import { crossoverMarginK } from "@/lib/plant/crossover";
import { marginSeries, type RuleContext } from "@/lib/rules/context";
import { ReadingHistory } from "@/lib/rules/history";
import { createSiteMonitor } from "@/lib/rules/runner";
import { parseRuleSettings } from "@/lib/rules/settings";

// The rule history keeps samples in typed arrays; this checks it against the plainest model
// (a sorted array of objects, pruned the same way) on random streams: mostly in order, some
// late, booleans and numbers, and a series that turns to strings part-way.

function model(retentionS: number) {
  const list: Array<{ tsMs: number; value: ReadingValue }> = [];
  return {
    add(tsMs: number, value: ReadingValue) {
      let i = list.length;
      while (i > 0 && list[i - 1].tsMs > tsMs) i--;
      list.splice(i, 0, { tsMs, value });
      const cutoff = list[list.length - 1].tsMs - retentionS * 1000;
      let drop = 0;
      while (drop < list.length - 1 && list[drop + 1].tsMs < cutoff) drop++;
      list.splice(0, drop);
    },
    latestAt(atMs: number) {
      for (let i = list.length - 1; i >= 0; i--) if (list[i].tsMs <= atMs) return list[i];
      return undefined;
    },
    numbers(fromMs: number, toMs: number) {
      return list
        .filter((s) => s.tsMs >= fromMs && s.tsMs <= toMs && typeof s.value === "number")
        .map((s) => ({ tsMs: s.tsMs, value: s.value as number }));
    },
  };
}

// Deterministic pseudo-random numbers (mulberry32).
function rng(seed: number) {
  let a = seed;
  return () => {
    a = (a + 0x6d2b79f5) | 0;
    let t = Math.imul(a ^ (a >>> 15), 1 | a);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

describe("rule history in typed arrays", () => {
  it.each([1, 2, 3])("answers like a sorted array of samples (seed %i)", (seed) => {
    const random = rng(seed);
    const retentionS = 600;
    const h = new ReadingHistory(retentionS);
    const m = { num: model(retentionS), bool: model(retentionS), mixed: model(retentionS) };
    let t = 1_700_000_000_000;
    for (let i = 0; i < 4000; i++) {
      t += 5000;
      const late = random() < 0.05 ? Math.floor(random() * 60_000) : 0;
      const ts = t - late;
      const v = Math.round(random() * 1000) / 10;
      h.add({ tsMs: ts, equipment: "CH-1", quantity: "chilled_water_leaving_temp", value: v });
      m.num.add(ts, v);
      const b = random() < 0.5;
      h.add({ tsMs: ts, equipment: "CH-1", quantity: "run_status", value: b });
      m.bool.add(ts, b);
      const x: ReadingValue = i < 2000 ? v : random() < 0.5 ? "auto" : v;
      h.add({ tsMs: ts, equipment: "CT-1", quantity: "fan_drive_mode", value: x });
      m.mixed.add(ts, x);
      if (i % 97 === 0) {
        const at = t - Math.floor(random() * retentionS * 1000);
        expect(h.latestAt("CH-1", "chilled_water_leaving_temp", at)).toEqual(m.num.latestAt(at));
        expect(h.latestAt("CH-1", "run_status", at)).toEqual(m.bool.latestAt(at));
        expect(h.latestAt("CT-1", "fan_drive_mode", at)).toEqual(m.mixed.latestAt(at));
        expect(h.numbers("CH-1", "chilled_water_leaving_temp", at - 120_000, at)).toEqual(
          m.num.numbers(at - 120_000, at),
        );
        expect(h.numbers("CT-1", "fan_drive_mode", at - 120_000, at)).toEqual(m.mixed.numbers(at - 120_000, at));
      }
    }
    expect(h.lastSeenAt("CH-1", t)).toBe(t);
    expect(h.firstSeenAt()).toBeLessThanOrEqual(1_700_000_005_000);
  });

  it("records boolean edges from in-order readings", () => {
    const h = new ReadingHistory();
    const seq = [false, false, true, true, false, true];
    seq.forEach((v, i) => h.add({ tsMs: i * 1000, equipment: "CH-1", quantity: "run_status", value: v }));
    expect(h.edges("CH-1", "run_status", 10_000)).toEqual({ rises: [2000, 5000], falls: [4000] });
  });
});

// The crossover margin series walks both temperature series once; its definition is "at every
// time either input was read in the window, CW entering minus CHW entering, each at its latest
// value at that time" (a reading before the window counts). Checked against that definition,
// evaluated point by point, on random streams with gaps and equal times.
describe("crossover margin series", () => {
  it.each([4, 5])("matches the point-by-point definition (seed %i)", (seed) => {
    const random = rng(seed);
    const h = new ReadingHistory();
    const site = [{ tag: "CH-1", kind: "chiller" as const }];
    let t = 1_700_000_000_000;
    for (let i = 0; i < 600; i++) {
      t += 1000 * (1 + Math.floor(random() * 8));
      if (random() < 0.7)
        h.add({ tsMs: t, equipment: "CH-1", quantity: "chilled_water_entering_temp", value: 10 + random() * 10 });
      if (random() < 0.7)
        h.add({
          tsMs: t + (random() < 0.3 ? 0 : 500),
          equipment: "CH-1",
          quantity: "condenser_water_entering_temp",
          value: 12 + random() * 20,
        });
    }
    const ctx = { site, history: h, nowMs: t - 30_000 } as unknown as RuleContext;
    const windowS = 900;
    const fromMs = ctx.nowMs - windowS * 1000;
    const times = [
      ...new Set(
        [
          ...h.numbers("CH-1", "chilled_water_entering_temp", fromMs, ctx.nowMs),
          ...h.numbers("CH-1", "condenser_water_entering_temp", fromMs, ctx.nowMs),
        ].map((s) => s.tsMs),
      ),
    ].sort((x, y) => x - y);
    const expected = times.flatMap((at) => {
      const cw = h.latestAt("CH-1", "condenser_water_entering_temp", at);
      const chw = h.latestAt("CH-1", "chilled_water_entering_temp", at);
      return cw && chw ? [{ tsMs: at, value: crossoverMarginK(cw.value as number, chw.value as number) }] : [];
    });
    expect(expected.length).toBeGreaterThan(50);
    expect(marginSeries(ctx, site[0], windowS)).toEqual(expected);
  });
});

describe("how much history a site monitor keeps", () => {
  it("the longest look-back of its rules (or the 1 h margin trend) plus 10 min: 70 min by default, longer when a setting asks", () => {
    expect(createSiteMonitor({ site: [] }).history.retentionS).toBe(70 * 60);
    const settings = parseRuleSettings({ efficiencyDrift: { averagingWindowS: 3 * 3600 } });
    expect(createSiteMonitor({ site: [], settings }).history.retentionS).toBe(3 * 3600 + 600);
  });
});
