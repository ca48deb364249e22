"use client";

import { useEffect, useMemo, useRef, useState } from "react";
import useSWR from "swr";
import type uPlot from "uplot";
import "uplot/dist/uPlot.min.css";
import type { SeriesDto } from "@/lib/dto/readings";
import { fetchJson } from "@/lib/client/fetcher";
import type { Measure } from "@/lib/quantities";
import { formatDuration, fromCanonical, type UnitSystem } from "@/lib/units";
import { useSiteEvents } from "@/components/realtime/use-site-events";
import { chartPalette, exposeXRange, siteTimeZone, themedAxis } from "./uplot-options";
import { useShownTheme } from "./use-theme-key";

export const ranges = { "1 h": 3600, "24 h": 86_400, "7 d": 7 * 86_400, "30 d": 30 * 86_400 } as const;
type RangeLabel = keyof typeof ranges;

/** Range start, rounded to the minute so the request stays cacheable while the range is shown. */
function rangeStartMs(range: RangeLabel): number {
  return Math.floor(Date.now() / 60_000) * 60_000 - ranges[range] * 1000;
}

/** The chosen range in seconds (uPlot's x unit): from its start up to now, or the newest value. */
function windowOf(fromMs: number, xs: ArrayLike<number>): [number, number] {
  return [fromMs / 1000, Math.max(Date.now() / 1000, xs.length ? xs[xs.length - 1] : 0)];
}

/**
 * One point's trend: min/max band (spikes stay visible) and average, over a chosen range,
 * appending live values as they arrive. Drag across the chart to zoom; double-click to reset.
 */
export function TrendChart({
  siteId,
  pointId,
  measure,
  unitSystem,
  label,
  timeZone,
}: {
  siteId: string;
  pointId: number;
  measure: Measure;
  unitSystem: UnitSystem;
  label: string;
  /** The site's IANA time zone: the time axis reads in site time, as the rest of the product does. */
  timeZone: string;
}) {
  const [view, setView] = useState(() => ({ range: "1 h" as RangeLabel, fromMs: rangeStartMs("1 h") }));
  const range = view.range;
  const box = useRef<HTMLDivElement>(null);
  const plot = useRef<uPlot | null>(null);
  const key = `/api/points/${pointId}/series?maxPoints=600&from=${view.fromMs}`;
  // Live values belong to the request they extend; a new range starts a new tail.
  const [liveTail, setLiveTail] = useState<{ key: string; points: Array<[number, number]> }>({ key, points: [] });
  const live = useMemo(() => (liveTail.key === key ? liveTail.points : []), [liveTail, key]);
  const { data, error } = useSWR<{ series: SeriesDto }>(key, fetchJson);

  useSiteEvents(
    { siteId },
    {
      onValues: (v) => {
        for (const p of v.values) {
          if (p.pointId === pointId && typeof p.value === "number") {
            const shown = fromCanonical(p.value, measure, unitSystem);
            setLiveTail((prev) => ({
              key,
              points: [...(prev.key === key ? prev.points.slice(-2000) : []), [p.tsMs, shown]],
            }));
          }
        }
      },
    },
  );

  // The stored series plus live values newer than its last bucket, as uPlot's columns (x in seconds).
  const columns = useMemo((): uPlot.AlignedData | null => {
    const s = data?.series;
    if (!s) return null;
    const lastT = s.time.length ? s.time[s.time.length - 1] : 0;
    const tail = live.filter(([t]) => t > lastT);
    return [
      [...s.time, ...tail.map(([t]) => t)].map((t) => t / 1000),
      [...s.min, ...tail.map(([, v]) => v)],
      [...s.max, ...tail.map(([, v]) => v)],
      [...s.avg, ...tail.map(([, v]) => v)],
    ];
  }, [data, live]);

  // A new plot per fetched series; live values extend it in place, so a zoom survives them.
  // Its x scale is the chosen range, not the data's extent: a new point's month holds a bucket
  // or two, and uPlot's own range for so few points spans years.
  const series = data?.series;
  const fromMs = view.fromMs;
  const theme = useShownTheme();
  const builtFor = useRef<{ series: SeriesDto; label: string; theme: string } | null>(null);
  /** The x maximum this component last set; anything else means the viewer zoomed. */
  const followedMax = useRef<number | null>(null);
  useEffect(() => {
    const unit = series?.unit;
    if (!series || !unit || !columns || !box.current) return;
    const existing = plot.current;
    if (
      existing &&
      builtFor.current?.series === series &&
      builtFor.current.label === label &&
      builtFor.current.theme === theme
    ) {
      // An unzoomed view follows now; a zoomed one stays where it is.
      const following =
        followedMax.current !== null && Math.abs((existing.scales.x.max ?? 0) - followedMax.current) < 0.5;
      existing.setData(columns, false);
      if (!following) return existing.redraw();
      const max = windowOf(fromMs, columns[0])[1];
      existing.setScale("x", { min: existing.scales.x.min ?? fromMs / 1000, max });
      followedMax.current = max;
      return;
    }
    let disposed = false;
    void import("uplot").then(({ default: UPlot }) => {
      if (disposed || !box.current) return;
      const showRange = (u: uPlot) => {
        const [min, max] = windowOf(fromMs, u.data[0]);
        u.setScale("x", { min, max });
        // What was asked for: uPlot applies a scale change on its next commit.
        followedMax.current = max;
      };
      const palette = chartPalette();
      const opts: uPlot.Options = {
        width: box.current.clientWidth || 600,
        height: 280,
        scales: { x: { time: true } },
        ...siteTimeZone(UPlot, timeZone),
        axes: [
          { font: "11px Inter, sans-serif", ...themedAxis(palette) },
          { label: unit, font: "11px Inter, sans-serif", size: 56, ...themedAxis(palette) },
        ],
        series: [
          {},
          { label: "min", stroke: palette.stale, width: 1 },
          { label: "max", stroke: palette.stale, width: 1 },
          { label: `${label} (${unit})`, stroke: palette.ink, width: 2 },
        ],
        // 8-digit hex: the stale token at 20 % alpha, in either theme.
        bands: [{ series: [2, 1], fill: `${palette.stale}33` }],
        // Drag to zoom; a double-click goes back to the chosen range (uPlot's own reset fits the data).
        cursor: { drag: { x: true, y: false }, bind: { dblclick: (u) => () => (showRange(u), null) } },
        hooks: { setScale: [exposeXRange] },
      };
      plot.current?.destroy();
      plot.current = new UPlot(opts, columns, box.current);
      builtFor.current = { series, label, theme };
      showRange(plot.current);
    });
    return () => {
      disposed = true;
    };
  }, [series, label, columns, fromMs, timeZone, theme]);

  useEffect(() => () => plot.current?.destroy(), []);

  return (
    <div className="flex flex-col gap-3">
      <div role="group" aria-label="Range" className="flex flex-wrap gap-2">
        {(Object.keys(ranges) as RangeLabel[]).map((r) => (
          <button
            key={r}
            type="button"
            aria-pressed={r === range}
            onClick={() => setView({ range: r, fromMs: rangeStartMs(r) })}
            className={`min-h-11 rounded border px-4 text-sm ${r === range ? "border-ink bg-ink text-on-strong" : "border-line bg-panel"}`}
          >
            {r}
          </button>
        ))}
      </div>
      {error ? <p className="text-alarm">{error.message}</p> : null}
      {data && data.series.time.length === 0 && live.length === 0 ? (
        <p className="text-muted">No readings in this range.</p>
      ) : null}
      <div
        ref={box}
        className="w-full overflow-hidden rounded-lg border border-line bg-panel p-2"
        data-testid="trend"
        role="img"
        aria-label={`Trend of ${label}`}
      />
      {data ? (
        <p className="text-xs text-muted">
          {data.series.source === "raw"
            ? "Raw readings"
            : data.series.source === "rollup_1h"
              ? "1-hour rollups"
              : "1-minute rollups"}
          {data.series.bucketMs
            ? `, ${formatDuration(data.series.bucketMs / 1000)} buckets (min/max band, average line)`
            : ""}
          . Drag to zoom, double-click to reset.
        </p>
      ) : null}
    </div>
  );
}
