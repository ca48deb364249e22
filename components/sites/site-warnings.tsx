"use client";

import useSWR from "swr";
import type { AlarmDto } from "@/lib/dto/alarms";
import type { SiteSnapshot } from "@/lib/plant/snapshot";
import { fetchJson } from "@/lib/client/fetcher";
import type { UnitSystem } from "@/lib/units";
import { AlarmCard } from "@/components/alarms/alarm-card";
import { useSiteEvents } from "@/components/realtime/use-site-events";
import { DerivedPanel } from "./derived-panel";

type Derived = {
  snapshot: SiteSnapshot | null;
  marginTrend: Record<string, { tsMs: number[]; marginK: number[] }>;
  marginTrendWindowS: number;
};

/** The site's active warnings and the numbers behind them, refreshed live. */
export function SiteWarnings({
  siteId,
  canAct,
  unitSystem,
  timeZone,
}: {
  siteId: string;
  canAct: boolean;
  unitSystem: UnitSystem;
  timeZone: string;
}) {
  const alarms = useSWR<{ alarms: AlarmDto[] }>(`/api/alarms?site=${encodeURIComponent(siteId)}`, fetchJson, {
    refreshInterval: 30_000,
  });
  const derived = useSWR<Derived>(`/api/sites/${encodeURIComponent(siteId)}/derived`, fetchJson, {
    refreshInterval: 10_000,
  });
  const refresh = () => {
    void alarms.mutate();
    void derived.mutate();
  };
  useSiteEvents({ siteId }, { onStatus: refresh, onReconnect: refresh });

  const shown = (alarms.data?.alarms ?? []).filter((a) => a.state !== "normal" && a.state !== "suppressed_by_design");
  return (
    <div className="flex flex-col gap-6">
      <section aria-labelledby="warnings-title">
        <h2 id="warnings-title" className="mb-2 text-lg font-semibold">
          {canAct ? "Active warnings and alarms" : "What is happening"}
        </h2>
        {alarms.error ? <p className="text-alarm">Could not load alarms: {alarms.error.message}</p> : null}
        {alarms.data && shown.length === 0 ? (
          <p className="rounded-lg border border-line bg-panel px-4 py-3 text-muted" data-testid="no-warnings">
            {canAct ? "No active warnings." : "Everything is running normally."}
          </p>
        ) : null}
        <div className="flex flex-col gap-3">
          {shown.map((a) => (
            <AlarmCard
              key={a.id}
              alarm={a}
              canAct={canAct}
              unitSystem={unitSystem}
              timeZone={timeZone}
              onChanged={refresh}
            />
          ))}
        </div>
      </section>
      {canAct ? (
        <section aria-labelledby="derived-title">
          <h2 id="derived-title" className="mb-2 text-lg font-semibold">
            Plant numbers
          </h2>
          <DerivedPanel
            snapshot={derived.data?.snapshot ?? null}
            marginTrend={derived.data?.marginTrend ?? {}}
            marginTrendWindowS={derived.data?.marginTrendWindowS ?? 0}
            unitSystem={unitSystem}
            timeZone={timeZone}
          />
        </section>
      ) : null}
    </div>
  );
}
