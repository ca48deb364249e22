"use client";

import { useState } from "react";
import useSWR from "swr";
import type { AlarmDto } from "@/lib/dto/alarms";
import type { SiteLatestDto } from "@/lib/dto/readings";
import type { SiteDataState } from "@/lib/freshness";
import { worstActive } from "@/lib/alarms/display-order";
import { fetchJson } from "@/lib/client/fetcher";
import { PriorityBadge } from "@/components/alarms/priority";
import { useSiteEvents } from "@/components/realtime/use-site-events";
import { siteAlarmsKey } from "./site-warnings";

const dataWords: Record<SiteDataState, string> = {
  live: "Data live",
  stale: "Data stale",
  offline: "Gateway offline",
  no_gateway: "No gateway",
};

/** One line under the site's name: its data status and the worst active alarm, both kept live. */
export function SiteStatusLine({ siteId, canAct }: { siteId: string; canAct: boolean }) {
  const alarms = useSWR<{ alarms: AlarmDto[] }>(siteAlarmsKey(siteId), fetchJson, { refreshInterval: 30_000 });
  const latest = useSWR<{ latest: SiteLatestDto }>(`/api/sites/${encodeURIComponent(siteId)}/latest`, fetchJson, {
    refreshInterval: 30_000,
  });
  const [pushed, setPushed] = useState<SiteDataState | null>(null);
  useSiteEvents(
    { siteId },
    {
      onStatus: (s) => {
        setPushed(s.data);
        void alarms.mutate();
      },
      onReconnect: () => void latest.mutate(),
    },
  );
  const data = pushed ?? latest.data?.latest.data ?? null;
  const worst = worstActive(alarms.data?.alarms ?? []);
  return (
    <p className="mt-1 flex min-w-0 items-center gap-2 text-sm" data-testid="site-status-line">
      <span
        className={`shrink-0 rounded border px-1.5 py-0.5 ${data && data !== "live" ? "border-stale font-semibold" : "border-line text-muted"}`}
        data-testid="site-data-state"
        data-state={data ?? "loading"}
      >
        {data ? `${data === "live" ? "●" : "⚠"} ${dataWords[data]}` : "…"}
      </span>
      {worst ? (
        <a href="#alarms" className="flex min-w-0 items-center gap-2 hover:underline" data-testid="site-worst-alarm">
          <PriorityBadge priority={worst.priority} />
          <span className="truncate">
            {worst.equipment}:{" "}
            {canAct ? worst.detail.technicianMessage : worst.detail.ownerMessage || worst.detail.technicianMessage}
          </span>
        </a>
      ) : alarms.data ? (
        <span className="text-muted">No active alarm</span>
      ) : null}
    </p>
  );
}
