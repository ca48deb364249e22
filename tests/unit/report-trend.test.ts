import { describe, expect, it } from "vitest";
import { niceTicks, reportTrendSvg } from "@/lib/service/report-trend";

describe("the report's trend picture", () => {
  it("puts axis ticks on a 1-2-5 step (the usual chart convention, common practice)", () => {
    expect(niceTicks(42.3, 97.8)).toEqual([50, 60, 70, 80, 90]);
    expect(niceTicks(6.1, 8.9)).toEqual([6.5, 7, 7.5, 8, 8.5]);
  });

  it("draws each line across the window, higher values higher up, with a legend per line", () => {
    const from = Date.UTC(2026, 5, 1, 14);
    const to = from + 3_600_000;
    const svg = reportTrendSvg(
      [
        { label: "CH-1 chilled water leaving", time: [from, to], value: [44, 44] },
        { label: "CH-1 condenser water entering", time: [from, to], value: [85, 95] },
      ],
      { fromMs: from, toMs: to, unit: "°F", timeZone: "America/Chicago" },
    )!;
    const lines = [...svg.matchAll(/<polyline[^>]*points="([^"]+)"/g)].map((m) =>
      m[1].split(" ").map((p) => p.split(",").map(Number)),
    );
    expect(lines).toHaveLength(2);
    // Both lines span the plot from left to right.
    expect(lines[0][0][0]).toBe(lines[1][0][0]);
    expect(lines[0].at(-1)![0]).toBe(lines[1].at(-1)![0]);
    // SVG y grows downward: the 95 °F end of the condenser line sits above its 85 °F start.
    expect(lines[1][1][1]).toBeLessThan(lines[1][0][1]);
    // 44 °F chilled water lies below all of the condenser water line.
    expect(lines[0][0][1]).toBeGreaterThan(lines[1][0][1]);
    expect(svg).toContain("CH-1 condenser water entering");
    // 14:00 UTC is 9:00 AM in Chicago in June (CDT, UTC−5).
    expect(svg).toContain("9:00 AM");
  });

  it("draws nothing without readings", () => {
    expect(
      reportTrendSvg([{ label: "x", time: [], value: [] }], { fromMs: 0, toMs: 1, unit: "°F", timeZone: "UTC" }),
    ).toBeNull();
  });
});
