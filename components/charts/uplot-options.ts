import type uPlot from "uplot";

// What every time chart of the product sets the same way.

/** Time labels in the site's IANA time zone (x values are Unix seconds), as every other time on a site's pages. */
export function siteTimeZone(UPlot: typeof uPlot, timeZone: string): Pick<uPlot.Options, "tzDate"> {
  return { tzDate: (ts: number) => UPlot.tzDate(new Date(ts * 1000), timeZone) };
}

/** Writes the shown time span (seconds) on the chart's root element, for tests: uPlot draws its axes on a canvas. */
export const exposeXRange = (u: uPlot, scaleKey: string) =>
  void (scaleKey === "x" && (u.root.dataset.xRange = `${u.scales.x.min},${u.scales.x.max}`));
