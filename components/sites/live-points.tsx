"use client";

import Link from "next/link";
import { useEffect, useState } from "react";
import useSWR from "swr";
import type { SiteLatestDto } from "@/lib/dto/readings";
import type { EquipmentDto } from "@/lib/dto/sites";
import type { SiteValues } from "@/lib/realtime/events";
import { fetchJson } from "@/lib/client/fetcher";
import { isQuantityKey, quantities, type Measure } from "@/lib/quantities";
import { formatDuration, formatValue, type UnitSystem } from "@/lib/units";
import { useSiteEvents } from "@/components/realtime/use-site-events";
import { isStale } from "@/lib/freshness";
import { tonsToKw } from "@/lib/plant/units";

type Live = Record<number, { value: number | boolean | string | null; tsMs: number | null; quality: string | null }>;

const kindLabel: Record<string, string> = {
  chiller: "Chiller",
  cooling_tower: "Cooling tower",
  pump: "Pump",
  air_handler: "Air handler",
  weather_station: "Weather station",
};
const dataLabel = {
  live: "Live",
  stale: "Stale: some points stopped updating",
  offline: "Gateway offline: no data",
  no_gateway: "No gateway: no data",
} as const;

/** Every equipment's points with live values, age and stale marks; each opens its trend. */
export function LivePoints({
  siteId,
  equipment,
  unitSystem,
}: {
  siteId: string;
  equipment: EquipmentDto[];
  unitSystem: UnitSystem;
}) {
  const { data, mutate } = useSWR<{ latest: SiteLatestDto }>(
    `/api/sites/${encodeURIComponent(siteId)}/latest`,
    fetchJson,
    { refreshInterval: 30_000 },
  );
  const [live, setLive] = useState<Live>({});
  const [nowMs, setNowMs] = useState(() => Date.now());
  useEffect(() => {
    const t = setInterval(() => setNowMs(Date.now()), 5000);
    return () => clearInterval(t);
  }, []);
  useSiteEvents(
    { siteId },
    {
      onValues: (v: SiteValues) =>
        setLive((prev) => {
          const next = { ...prev };
          for (const p of v.values)
            if (!next[p.pointId]?.tsMs || (next[p.pointId].tsMs ?? 0) <= p.tsMs)
              next[p.pointId] = { value: p.value, tsMs: p.tsMs, quality: p.quality };
          return next;
        }),
      onReconnect: () => void mutate(),
    },
  );

  const byId = new Map((data?.latest.points ?? []).map((p) => [p.pointId, p]));
  const status = data?.latest.data;
  return (
    <div className="flex flex-col gap-4">
      {status ? (
        <p
          className={`rounded px-3 py-2 text-sm ${status === "live" ? "bg-panel text-muted" : "bg-stale text-on-strong"}`}
          data-testid="site-data-status"
          // A polite live region: read out when the data status changes, never on each value.
          role="status"
        >
          {dataLabel[status]}
        </p>
      ) : null}
      {equipment.map((e) => (
        <section
          key={e.id}
          aria-labelledby={`eq-${e.id}`}
          className="rounded-lg border border-line bg-panel"
          data-testid="equipment"
        >
          <header className="flex flex-wrap items-baseline gap-x-3 border-b border-line px-4 py-2">
            <h3 id={`eq-${e.id}`} className="font-semibold">
              {e.tag} <span className="font-normal text-muted">{e.name}</span>
            </h3>
            <p className="text-sm text-muted">
              {[
                kindLabel[e.kind] ?? e.kind,
                e.capacityTons
                  ? unitSystem === "ip"
                    ? `${e.capacityTons} tons`
                    : `${Math.round(tonsToKw(e.capacityTons))} kW`
                  : null,
                e.refrigerant,
                e.serves ? `serves ${e.serves}` : null,
              ]
                .filter(Boolean)
                .join(" · ")}
            </p>
          </header>
          <div tabIndex={0} role="region" aria-label={`${e.tag} points`} className="overflow-x-auto">
            <table className="w-full text-sm">
              <thead className="sr-only">
                <tr>
                  <th scope="col">Point</th>
                  <th scope="col">Value</th>
                  <th scope="col">Age</th>
                  <th scope="col">Brick class</th>
                </tr>
              </thead>
              <tbody>
                {e.points.map((p) => {
                  const q = isQuantityKey(p.quantity) ? quantities[p.quantity] : undefined;
                  const measure: Measure = q?.measure ?? "text";
                  const latest = byId.get(p.id);
                  const pushed = live[p.id];
                  const tsMs = pushed?.tsMs ?? latest?.tsMs ?? null;
                  const value = pushed ? pushed.value : (latest?.value ?? null);
                  const stale = tsMs === null || isStale(tsMs, p.expectedIntervalS, nowMs) || status === "offline";
                  return (
                    <tr
                      key={p.id}
                      className="border-t border-line/60 first:border-t-0"
                      data-testid="point-row"
                      data-point={p.key}
                      data-equipment={e.tag}
                    >
                      <th scope="row" className="px-4 py-1.5 text-left font-normal">
                        <Link href={`/sites/${siteId}/points/${p.id}`} className="hover:underline">
                          {q?.label ?? p.key}
                        </Link>
                      </th>
                      <td
                        className={`px-4 py-1.5 text-right tabular-nums ${stale ? "text-stale" : "font-semibold"}`}
                        data-testid="point-value"
                      >
                        {tsMs === null ? "no data" : formatValue(value, measure, unitSystem)}
                      </td>
                      <td className="whitespace-nowrap px-4 py-1.5 text-right text-xs text-muted">
                        {tsMs === null ? (
                          ""
                        ) : stale ? (
                          <span className="rounded bg-stale px-1.5 py-0.5 text-on-strong">
                            stale · {formatDuration((nowMs - tsMs) / 1000)}
                          </span>
                        ) : (
                          `${formatDuration((nowMs - tsMs) / 1000)} ago`
                        )}
                      </td>
                      <td className="hidden px-4 py-1.5 font-mono text-xs text-muted lg:table-cell">{p.brickClass}</td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
          </div>
        </section>
      ))}
    </div>
  );
}
