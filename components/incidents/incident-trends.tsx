"use client";

import { useEffect, useRef } from "react";
import type uPlot from "uplot";
import "uplot/dist/uPlot.min.css";
import type { TrendPanelDto } from "@/lib/dto/incidents";
import { siteTimeZone } from "@/components/charts/uplot-options";

export interface TrendMarker {
  atMs: number;
  label: string;
  /** Alarm raised: drawn solid; other events dashed (state shown by line style and label, not colour alone). */
  strong: boolean;
}

// Greys and one dark ink (ISA-101: colour is kept for abnormal); series told apart by dash and width.
const strokes = ["#1f2328", "#5b636b", "#1f2328", "#8a8f96"];
const dashes: (number[] | undefined)[] = [undefined, undefined, [6, 4], [2, 3]];

/** Every panel on one column of data: the union of the panels' times, each series filled with gaps. */
function aligned(panel: TrendPanelDto): uPlot.AlignedData {
  const times = [...new Set(panel.series.flatMap((s) => s.tsMs))].sort((a, b) => a - b);
  const index = new Map(times.map((t, i) => [t, i]));
  const cols = panel.series.map((s) => {
    const col: (number | null)[] = new Array(times.length).fill(null);
    s.tsMs.forEach((t, i) => (col[index.get(t)!] = s.values[i]));
    return col;
  });
  return [times.map((t) => t / 1000), ...cols] as uPlot.AlignedData;
}

/** Vertical lines at the timeline's events and horizontal ones at each threshold, drawn under the series. */
function overlays(markers: readonly TrendMarker[], thresholds: TrendPanelDto["thresholds"]): uPlot.Plugin {
  return {
    hooks: {
      draw: (u) => {
        const ctx = u.ctx;
        ctx.save();
        const { left, top, width, height } = u.bbox;
        for (const m of markers) {
          const x = u.valToPos(m.atMs / 1000, "x", true);
          if (x < left || x > left + width) continue;
          ctx.strokeStyle = m.strong ? "#7a1010" : "#8a8f96";
          ctx.setLineDash(m.strong ? [] : [3, 3]);
          ctx.lineWidth = 1;
          ctx.beginPath();
          ctx.moveTo(x, top);
          ctx.lineTo(x, top + height);
          ctx.stroke();
        }
        for (const t of thresholds) {
          const y = u.valToPos(t.value, "y", true);
          if (y < top || y > top + height) continue;
          ctx.strokeStyle = "#b45309";
          ctx.setLineDash([8, 4]);
          ctx.beginPath();
          ctx.moveTo(left, y);
          ctx.lineTo(left + width, y);
          ctx.stroke();
          ctx.fillStyle = "#5b636b";
          ctx.font = `${11 * devicePixelRatio}px Inter, sans-serif`;
          ctx.fillText(t.label, left + 4, y - 4);
        }
        ctx.restore();
      },
    },
  };
}

/**
 * The incident's trends stacked on one shared time axis with one cursor (uPlot cursor sync): moving
 * over any panel shows the same instant on all of them. Times in the site's time zone.
 */
export function IncidentTrends({
  panels,
  markers,
  timeZone,
  fromMs,
  toMs,
}: {
  panels: TrendPanelDto[];
  markers: TrendMarker[];
  timeZone: string;
  fromMs: number;
  toMs: number;
}) {
  const box = useRef<HTMLDivElement>(null);
  useEffect(() => {
    let disposed = false;
    const plots: uPlot[] = [];
    void import("uplot").then(({ default: UPlot }) => {
      if (disposed || !box.current) return;
      const syncKey = `incident-${fromMs}-${toMs}`;
      const hosts = Array.from(box.current.querySelectorAll<HTMLDivElement>("[data-panel-chart]"));
      panels.forEach((panel, i) => {
        const host = hosts[i];
        if (!host) return;
        host.replaceChildren();
        const thresholds = panel.thresholds;
        const values = panel.series.flatMap((s) => s.values.filter((v): v is number => v !== null));
        const lo = Math.min(...values, ...thresholds.map((t) => t.value));
        const hi = Math.max(...values, ...thresholds.map((t) => t.value));
        const pad = Math.max(0.5, (hi - lo) * 0.08);
        const opts: uPlot.Options = {
          width: host.clientWidth || 600,
          height: panel.id === "states" ? 140 : 180,
          ...siteTimeZone(UPlot, timeZone),
          scales: {
            x: { time: true, min: fromMs / 1000, max: toMs / 1000 },
            y: panel.id === "states" ? { range: [-0.2, 2.2] } : { range: [lo - pad, hi + pad] },
          },
          cursor: { sync: { key: syncKey, setSeries: false }, drag: { x: false, y: false } },
          legend: { live: true },
          axes: [{ font: "11px Inter, sans-serif" }, { label: panel.unit, font: "11px Inter, sans-serif", size: 52 }],
          series: [
            {},
            ...panel.series.map((s, j) => ({
              label: s.label,
              stroke: strokes[j % strokes.length],
              dash: dashes[j % dashes.length],
              width: j === 0 ? 2 : 1.5,
              paths: panel.id === "states" ? UPlot.paths.stepped!({ align: 1 }) : undefined,
              spanGaps: true,
            })),
          ],
          plugins: [overlays(markers, thresholds)],
        };
        plots.push(new UPlot(opts, aligned(panel), host));
      });
    });
    const resize = () => {
      for (const p of plots) {
        const w = p.root.parentElement?.clientWidth;
        if (w) p.setSize({ width: w, height: p.height });
      }
    };
    window.addEventListener("resize", resize);
    return () => {
      disposed = true;
      window.removeEventListener("resize", resize);
      for (const p of plots) p.destroy();
    };
  }, [panels, markers, timeZone, fromMs, toMs]);

  return (
    <div ref={box} className="flex flex-col gap-4" data-testid="incident-trends">
      {panels.map((p) => (
        <figure key={p.id} className="rounded border border-line bg-panel p-2" data-panel={p.id}>
          <figcaption className="mb-1 text-sm font-semibold">
            {p.title} <span className="font-normal text-muted">({p.unit})</span>
          </figcaption>
          <div
            data-panel-chart
            className="w-full overflow-hidden"
            role="img"
            aria-label={`${p.title} over the incident`}
          />
        </figure>
      ))}
      <p className="text-xs text-muted">
        Markers: solid line = alarm raised, dashed = plant event or a person&apos;s action; dashed horizontal =
        threshold (labelled). One cursor moves across every chart.
      </p>
    </div>
  );
}
