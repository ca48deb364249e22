"use client";

import { useEffect, useMemo, useState } from "react";
import useSWR from "swr";
import type { SiteLatestDto } from "@/lib/dto/readings";
import type { TemporaryChangeDto } from "@/lib/dto/service";
import type { SiteSnapshot } from "@/lib/plant/snapshot";
import type { OverviewModel } from "@/lib/plant/overview-layout";
import { lockoutLeftNowS, soonestCrossover, runStateWord, equipmentState } from "@/lib/plant/overview-values";
import type { SiteDataState } from "@/lib/freshness";
import { isStale } from "@/lib/freshness";
import { fetchJson } from "@/lib/client/fetcher";
import type { UnitSystem } from "@/lib/units";
import { useSiteEvents } from "@/components/realtime/use-site-events";
import { PlantOverview, type OverviewChillerValues, type OverviewPointValue } from "./plant-overview";

type Pushed = Record<number, { value: number | boolean | string; tsMs: number }>;
type Derived = { snapshot: SiteSnapshot | null };

export const dataStatusWords: Record<SiteDataState, string> = {
  live: "Live",
  stale: "Stale: some values stopped updating (dashed underline)",
  offline: "Gateway offline: last known values, not live",
  no_gateway: "No gateway: no data",
};

/**
 * The overview fed live: latest values, then every pushed value over the site's socket room; the
 * derived numbers (margin, lockout, projection) from the site snapshot; temporary changes in place.
 * Draws the phone variant below the md breakpoint and the wide one above it.
 */
export function LivePlantOverview({
  siteId,
  siteName,
  narrow,
  wide,
  unitSystem,
}: {
  siteId: string;
  siteName: string;
  narrow: OverviewModel;
  wide: OverviewModel;
  unitSystem: UnitSystem;
}) {
  const id = encodeURIComponent(siteId);
  const latest = useSWR<{ latest: SiteLatestDto }>(`/api/sites/${id}/latest`, fetchJson, { refreshInterval: 30_000 });
  const derived = useSWR<Derived>(`/api/sites/${id}/derived`, fetchJson, { refreshInterval: 10_000 });
  const changes = useSWR<{ changes: TemporaryChangeDto[] }>(`/api/sites/${id}/temporary-changes`, fetchJson, {
    refreshInterval: 30_000,
  });
  const [pushed, setPushed] = useState<Pushed>({});
  const [pushedState, setPushedState] = useState<SiteDataState | null>(null);
  const [nowMs, setNowMs] = useState(() => Date.now());
  useEffect(() => {
    const t = setInterval(() => setNowMs(Date.now()), 1000);
    return () => clearInterval(t);
  }, []);
  useSiteEvents(
    { siteId },
    {
      onValues: (v) =>
        setPushed((prev) => {
          const next = { ...prev };
          for (const p of v.values)
            if (!next[p.pointId] || next[p.pointId].tsMs <= p.tsMs) next[p.pointId] = { value: p.value, tsMs: p.tsMs };
          return next;
        }),
      onStatus: (s) => {
        setPushedState(s.data);
        void derived.mutate();
      },
      onReconnect: () => {
        void latest.mutate();
        void derived.mutate();
      },
    },
  );

  const dataState = pushedState ?? latest.data?.latest.data ?? null;
  const values = useMemo(() => {
    const out: Record<number, OverviewPointValue> = {};
    for (const p of latest.data?.latest.points ?? []) {
      const push = pushed[p.pointId];
      const useLatest = !push || (p.tsMs ?? 0) > push.tsMs;
      const tsMs = useLatest ? p.tsMs : push.tsMs;
      out[p.pointId] = {
        value: useLatest ? p.value : push.value,
        tsMs,
        stale: tsMs === null || isStale(tsMs, p.expectedIntervalS, nowMs) || dataState === "offline",
      };
    }
    return out;
  }, [latest.data, pushed, nowMs, dataState]);

  const snapshot = derived.data?.snapshot ?? null;
  const chillers: Record<string, OverviewChillerValues> = {};
  for (const c of snapshot?.chillers ?? [])
    chillers[c.tag] = {
      marginK: c.crossoverMarginK,
      minMarginK: c.startMarginK,
      // Counts down from the snapshot's event time (the site's latest reading, close to now while live).
      lockoutLeftS: lockoutLeftNowS(c.lockout, snapshot?.atMs ?? nowMs, nowMs),
      crossover: soonestCrossover(c.timeToCrossover, c.slowTimeToCrossover),
    };
  const changedTags = (changes.data?.changes ?? []).flatMap((c) => (c.equipmentTag ? [c.equipmentTag] : []));

  // Announced politely when a chiller changes state, not on every value (WCAG 4.1.3).
  const summary = narrow.states
    .filter((s) => s.kind === "chiller")
    .map((s) => {
      const v = (pid: number | undefined) => (pid === undefined ? undefined : values[pid]);
      const b = (x: OverviewPointValue | undefined) => (x && !x.stale && typeof x.value === "boolean" ? x.value : null);
      const state = equipmentState("chiller", { run: b(v(s.refs.run)), faults: s.refs.faults.map((f) => b(v(f))) });
      return `${s.tag} ${runStateWord[state].toLowerCase()}`;
    })
    .join(", ");

  const common = {
    values,
    chillers,
    changedTags,
    unitSystem,
    trendHref: `/sites/${id}/points/`,
    dataState,
    label: `${siteName}: plant overview`,
  };
  const abnormal = dataState !== null && dataState !== "live";
  return (
    <div data-testid="plant-overview">
      <p
        className={`mb-2 rounded border-2 px-3 py-1.5 text-sm ${abnormal ? "border-stale bg-panel font-semibold text-ink" : "border-transparent bg-panel text-muted"}`}
        data-testid="overview-data-status"
        data-state={dataState ?? "loading"}
      >
        {abnormal ? "⚠ " : ""}
        {dataState ? dataStatusWords[dataState] : "Loading values…"}
      </p>
      <div className="rounded-lg border border-line bg-panel p-2">
        <div className="md:hidden">
          <PlantOverview model={narrow} {...common} />
        </div>
        <div className="hidden md:block">
          <PlantOverview model={wide} {...common} />
        </div>
        <p className="mt-1 px-1 text-xs text-muted">
          Solid line: supply; dashed: return. ▶ run · □ off · ◐ hand · ◆ fault · ○ no data. Dashed underline: stale. Tap
          a value for its trend. Lockout times are the controller&apos;s or its timers&apos;: restart a chiller only as
          the manufacturer&apos;s procedure allows.
        </p>
      </div>
      <p className="sr-only" aria-live="polite">
        {summary}
      </p>
    </div>
  );
}
