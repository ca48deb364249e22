import type uPlot from "uplot";

// What every time chart of the product sets the same way.

/** Time labels in the site's IANA time zone (x values are Unix seconds), as every other time on a site's pages. */
export function siteTimeZone(UPlot: typeof uPlot, timeZone: string): Pick<uPlot.Options, "tzDate"> {
  return { tzDate: (ts: number) => UPlot.tzDate(new Date(ts * 1000), timeZone) };
}

/** Writes the shown time span (seconds) on the chart's root element, for tests: uPlot draws its axes on a canvas. */
export const exposeXRange = (u: uPlot, scaleKey: string) =>
  void (scaleKey === "x" && (u.root.dataset.xRange = `${u.scales.x.min},${u.scales.x.max}`));

/** The theme's colours for a canvas, read from the CSS tokens (uPlot draws on a canvas, which CSS cannot restyle). */
export function chartPalette() {
  const css = getComputedStyle(document.documentElement);
  const token = (name: string, fallback: string) => css.getPropertyValue(`--color-${name}`).trim() || fallback;
  return {
    ink: token("ink", "#1f2328"),
    muted: token("muted", "#5b636b"),
    line: token("line", "#d8dcdf"),
    stale: token("stale", "#686e75"),
    alarm: token("alarm", "#9c1c13"),
  };
}

/** Axis labels and grid in the theme's colours. */
export function themedAxis(p: ReturnType<typeof chartPalette>): Pick<uPlot.Axis, "stroke" | "grid" | "ticks"> {
  return { stroke: p.muted, grid: { stroke: p.line, width: 1 }, ticks: { stroke: p.line, width: 1 } };
}
