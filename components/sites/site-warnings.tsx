"use client";

import useSWR from "swr";
import type { AlarmDto } from "@/lib/dto/alarms";
import type { SiteSnapshot } from "@/lib/plant/snapshot";
import { fetchJson } from "@/lib/client/fetcher";
import { isQuiet, orderForDisplay } from "@/lib/alarms/display-order";
import type { UnitSystem } from "@/lib/units";
import { AlarmCard } from "@/components/alarms/alarm-card";
import { PriorityBadge, ownerStateLabel, stateLabel } from "@/components/alarms/priority";
import { useSiteEvents } from "@/components/realtime/use-site-events";
import { DerivedPanel } from "./derived-panel";

type Derived = {
  snapshot: SiteSnapshot | null;
  marginTrend: Record<string, { tsMs: number[]; marginK: number[] }>;
  marginTrendWindowS: number;
};

export const siteAlarmsKey = (siteId: string) => `/api/alarms?site=${encodeURIComponent(siteId)}`;
const derivedKey = (siteId: string) => `/api/sites/${encodeURIComponent(siteId)}/derived`;

/**
 * The site's alarms in reading order (lib/alarms/display-order.ts): active unacknowledged first;
 * those that returned to normal unacknowledged, and shelved ones, follow as quieter one-line entries
 * that open to the full card.
 */
export function SiteAlarms({
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
  const alarms = useSWR<{ alarms: AlarmDto[] }>(siteAlarmsKey(siteId), fetchJson, { refreshInterval: 30_000 });
  const refresh = () => void alarms.mutate();
  useSiteEvents({ siteId }, { onStatus: refresh, onReconnect: refresh });
  const shown = orderForDisplay(alarms.data?.alarms ?? []);
  const card = (a: AlarmDto) => (
    <AlarmCard key={a.id} alarm={a} canAct={canAct} unitSystem={unitSystem} timeZone={timeZone} onChanged={refresh} />
  );
  return (
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
        {shown.map((a) =>
          isQuiet(a.state) ? (
            <details key={a.id} className="rounded-lg border border-line bg-surface" data-testid="quiet-alarm">
              <summary className="flex cursor-pointer flex-wrap items-center gap-2 px-3 py-2 text-sm text-muted">
                <PriorityBadge priority={a.priority} />
                <span className="font-semibold text-ink">{a.equipment}</span>
                <span>{canAct ? stateLabel[a.state] : ownerStateLabel[a.state]}:</span>
                <span className="min-w-0 flex-1 truncate">
                  {canAct ? a.detail.technicianMessage : a.detail.ownerMessage || a.detail.technicianMessage}
                </span>
              </summary>
              <div className="p-2">{card(a)}</div>
            </details>
          ) : (
            card(a)
          ),
        )}
      </div>
    </section>
  );
}

/** The numbers behind the warnings (staff), refreshed live. */
export function SitePlantNumbers({
  siteId,
  unitSystem,
  timeZone,
}: {
  siteId: string;
  unitSystem: UnitSystem;
  timeZone: string;
}) {
  const derived = useSWR<Derived>(derivedKey(siteId), fetchJson, { refreshInterval: 10_000 });
  const refresh = () => void derived.mutate();
  useSiteEvents({ siteId }, { onStatus: refresh, onReconnect: refresh });
  return (
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
  );
}

/** The site's active warnings and, for staff, the numbers behind them. */
export function SiteWarnings(props: { siteId: string; canAct: boolean; unitSystem: UnitSystem; timeZone: string }) {
  return (
    <div className="flex flex-col gap-6">
      <SiteAlarms {...props} />
      {props.canAct ? <SitePlantNumbers {...props} /> : null}
    </div>
  );
}
