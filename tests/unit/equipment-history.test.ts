import { describe, expect, it } from "vitest";
import { changesOnly, mergeHistory, runTotals } from "@/lib/equipment-history";

// Worked example written out here (hours-meter arithmetic, common practice): a chiller samples its
// run status; it runs 08:00–10:30, stops, runs again 11:00–12:00, and the window is 08:00–12:00.
const H = 3_600_000;
const day = Date.UTC(2026, 5, 1);
const at = (h: number) => day + h * H;

describe("run hours and starts from run status", () => {
  it("counts 3.5 h and 2 starts across a window that opens stopped", () => {
    const samples = [
      { ts: at(8), on: true },
      { ts: at(9), on: true },
      { ts: at(10.5), on: false },
      { ts: at(11), on: true },
      { ts: at(11.5), on: true },
    ];
    const t = runTotals(samples, at(8), at(12), { ts: at(7), on: false });
    // 08:00–10:30 = 2.5 h, 11:00–12:00 = 1 h.
    expect(t.runHours).toBeCloseTo(3.5, 9);
    expect(t.starts).toBe(2);
    expect(t.transitions.map((s) => s.on)).toEqual([true, false, true]);
  });

  it("counts from the window's start when it opens running, without a start", () => {
    const t = runTotals([{ ts: at(9), on: false }], at(8), at(12), { ts: at(6), on: true });
    expect(t.runHours).toBeCloseTo(1, 9);
    expect(t.starts).toBe(0);
  });

  it("does not call the first sample ever seen a start", () => {
    const t = runTotals([{ ts: at(8), on: true }], at(8), at(10));
    expect(t.starts).toBe(0);
    expect(t.runHours).toBeCloseTo(2, 9);
  });
});

describe("timeline", () => {
  it("keeps only changes of a fault text", () => {
    const xs = ["", "", "HP trip", "HP trip", "", "Drive overtemp"].map((text, i) => ({ ts: i, text }));
    expect(changesOnly(xs, (x) => x.text).map((x) => x.ts)).toEqual([0, 2, 4, 5]);
  });

  it("merges newest first and filters by kind", () => {
    const events = [
      { atMs: 1, kind: "alarm" as const, title: "a" },
      { atMs: 3, kind: "visit" as const, title: "v" },
      { atMs: 2, kind: "fault" as const, title: "f" },
    ];
    expect(mergeHistory(events).map((e) => e.title)).toEqual(["v", "f", "a"]);
    expect(mergeHistory(events, ["alarm", "fault"]).map((e) => e.title)).toEqual(["f", "a"]);
  });
});
