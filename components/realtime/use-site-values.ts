"use client";

import { useState } from "react";
import useSWR from "swr";
import type { SiteLatestDto } from "@/lib/dto/readings";
import type { SiteValues } from "@/lib/realtime/events";
import { fetchJson } from "@/lib/client/fetcher";
import { useSiteEvents } from "./use-site-events";

export type PushedValues = Record<number, SiteValues["values"][number]>;

/**
 * A site's latest stored values (refetched every `refreshMs` and on reconnect) and the newer ones
 * pushed over the socket since, by point id. The newer of the two is the value now.
 */
export function useSiteValues(
  siteId: string,
  refreshMs: number,
  enabled = true,
): { latest: SiteLatestDto | undefined; pushed: PushedValues } {
  const { data, mutate } = useSWR<{ latest: SiteLatestDto }>(
    enabled ? `/api/sites/${encodeURIComponent(siteId)}/latest` : null,
    fetchJson,
    { refreshInterval: refreshMs },
  );
  const [pushed, setPushed] = useState<PushedValues>({});
  useSiteEvents(
    { siteId },
    {
      onValues: (v: SiteValues) =>
        setPushed((prev) => {
          const next = { ...prev };
          for (const p of v.values) if ((next[p.pointId]?.tsMs ?? 0) <= p.tsMs) next[p.pointId] = p;
          return next;
        }),
      onReconnect: () => void mutate(),
    },
  );
  return { latest: data?.latest, pushed };
}
