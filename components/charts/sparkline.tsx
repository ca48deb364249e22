"use client";

import { useEffect, useRef } from "react";
import type uPlot from "uplot";
import "uplot/dist/uPlot.min.css";
import { chartPalette, exposeXRange, siteTimeZone, themedAxis } from "./uplot-options";
import { useShownTheme } from "./use-theme-key";

/** The dashed line at zero: where the loops cross. */
function drawZeroLine(u: uPlot) {
  const y = u.valToPos(0, "y", true);
  if (y < u.bbox.top || y > u.bbox.top + u.bbox.height) return;
  u.ctx.save();
  u.ctx.strokeStyle = chartPalette().alarm;
  u.ctx.setLineDash([4, 4]);
  u.ctx.beginPath();
  u.ctx.moveTo(u.bbox.left, y);
  u.ctx.lineTo(u.bbox.left + u.bbox.width, y);
  u.ctx.stroke();
  u.ctx.restore();
}

/**
 * A small uPlot line with an optional zero line (the crossover), client-only. `xRangeMs` fixes
 * the time axis to the window the values come from: uPlot's own fit of one or two points spans years.
 */
export function Sparkline({
  xs,
  ys,
  label,
  height = 90,
  zeroLine = false,
  xRangeMs,
  timeZone,
}: {
  xs: number[];
  ys: number[];
  label: string;
  height?: number;
  zeroLine?: boolean;
  xRangeMs?: readonly [number, number];
  /** The site's IANA time zone for the time axis (the browser's when absent). */
  timeZone?: string;
}) {
  const [fromMs, toMs] = xRangeMs ?? [null, null];
  const box = useRef<HTMLDivElement>(null);
  const plot = useRef<uPlot | null>(null);
  const theme = useShownTheme();

  useEffect(() => {
    let disposed = false;
    void import("uplot").then(({ default: UPlot }) => {
      if (disposed || !box.current) return;
      const width = box.current.clientWidth || 300;
      const palette = chartPalette();
      const opts: uPlot.Options = {
        width,
        height,
        legend: { show: false },
        ...(timeZone ? siteTimeZone(UPlot, timeZone) : {}),
        cursor: { show: false },
        scales: {
          x:
            fromMs !== null && toMs !== null
              ? { time: true, range: (): uPlot.Range.MinMax => [fromMs / 1000, toMs / 1000] }
              : { time: true },
        },
        axes: [
          { size: 28, font: "11px Inter, sans-serif", ...themedAxis(palette) },
          { size: 40, font: "11px Inter, sans-serif", ...themedAxis(palette) },
        ],
        series: [{}, { label, stroke: palette.ink, width: 1.5 }],
        hooks: {
          setScale: [exposeXRange],
          ...(zeroLine ? { draw: [drawZeroLine] } : {}),
        },
      };
      plot.current?.destroy();
      plot.current = new UPlot(opts, [xs.map((x) => x / 1000), ys], box.current);
    });
    return () => {
      disposed = true;
    };
  }, [xs, ys, label, height, zeroLine, fromMs, toMs, timeZone, theme]);

  useEffect(() => () => plot.current?.destroy(), []);

  return <div ref={box} role="img" aria-label={label} className="w-full" />;
}
