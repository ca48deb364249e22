"use client";

import Link from "next/link";
import { useEffect } from "react";
import useSWR from "swr";
import type { SiteSummaryDto } from "@/lib/dto/sites";
import type { SiteStatus } from "@/lib/realtime/events";
import { fetchJson } from "@/lib/client/fetcher";
import { PriorityBadge } from "@/components/alarms/priority";
import { useSiteEvents } from "@/components/realtime/use-site-events";
import { inPlaceFor } from "@/lib/service/changes";
import { useNow } from "@/components/service/use-now";
import { saveBoardSnapshot } from "@/components/pwa/service-worker";
import { useQuantityText } from "@/components/layout/unit-system";

export type BoardSite = SiteSummaryDto & { status?: SiteStatus };

const dataLabel: Record<SiteStatus["data"], string> = {
  live: "Live",
  stale: "Stale data",
  offline: "Gateway offline",
  no_gateway: "No gateway",
};
const crossoverRules = new Set(["crossover_risk", "restart_race", "loops_crossed"]);
const edge: Record<number, string> = {
  1: "border-l-critical",
  2: "border-l-alarm",
  3: "border-l-warning",
  4: "border-l-line",
};

function severity(s: BoardSite): number {
  const w = s.status?.worst;
  return w ? w.priority * 2 - (w.active ? 1 : 0) : 99;
}

/** Temporary changes in place per site: how many, since when, and the earliest put-back-by. */
export type BoardChanges = Record<string, { count: number; oldestMadeAt: number; earliestDueAt: number }>;

export function SiteBoard({
  fallback,
  canAct,
  changes = {},
}: {
  fallback: BoardSite[];
  canAct: boolean;
  changes?: BoardChanges;
}) {
  const now = useNow();
  const words = useQuantityText();
  const { data, error, mutate } = useSWR<{ sites: BoardSite[] }>("/api/sites", fetchJson, {
    fallbackData: { sites: fallback },
  });
  useSiteEvents("board", {
    onStatus: (status) =>
      void mutate(
        (current) => current && { sites: current.sites.map((s) => (s.id === status.siteId ? { ...s, status } : s)) },
        { revalidate: false },
      ),
    onReconnect: () => void mutate(),
  });
  // The most urgent plant first: on a phone it is the one the technician must see.
  const sites = [...(data?.sites ?? [])].sort((a, b) => severity(a) - severity(b) || a.name.localeCompare(b.name));
  // The offline page shows this board, marked not live, when the phone has no connection.
  useEffect(() => {
    void saveBoardSnapshot(
      (data?.sites ?? []).map((s) => ({
        name: s.name,
        data: dataLabel[s.status?.data ?? "no_gateway"],
        alarm: s.status?.worst?.active ? words(canAct ? s.status.worst.title : s.status.worst.ownerTitle) : null,
      })),
    ).catch(() => undefined);
  }, [data, canAct, words]);
  return (
    <section aria-labelledby="board-title">
      <h1 id="board-title" className="text-2xl font-semibold">
        Plants
      </h1>
      {error ? <p className="mt-2 text-alarm">Could not refresh the board: {error.message}</p> : null}
      {sites.length === 0 ? <p className="mt-4 text-muted">No sites yet.</p> : null}
      <ul className="mt-4 grid gap-3 sm:grid-cols-2 lg:grid-cols-3" data-testid="site-list">
        {sites.map((site) => {
          const w = site.status?.worst;
          const crossover = w?.active && crossoverRules.has(w.ruleId);
          return (
            <li key={site.id}>
              <Link
                href={`/sites/${site.id}`}
                className={`block rounded-lg border border-l-8 border-line bg-panel p-4 hover:border-ink ${w?.active ? edge[w.priority] : "border-l-line"} ${crossover ? "ring-2 ring-alarm" : ""}`}
                data-testid="site-card"
                data-site={site.id}
              >
                <div className="flex items-start justify-between gap-2">
                  <h2 className="font-semibold">{site.name}</h2>
                  <span
                    className={`shrink-0 rounded px-2 py-0.5 text-xs ${site.status?.data === "live" ? "bg-surface text-muted" : "bg-stale text-on-strong"}`}
                    data-testid="site-data"
                  >
                    {dataLabel[site.status?.data ?? "no_gateway"]}
                  </span>
                </div>
                <p className="mt-1 text-sm text-muted">{site.customer.name}</p>
                {w ? (
                  <div className="mt-3 flex flex-col gap-1" data-testid="site-worst" data-rule={w.ruleId}>
                    <div className="flex items-center gap-2">
                      <PriorityBadge priority={w.priority} />
                      {crossover ? (
                        <span className="text-sm font-semibold text-alarm">Loops heading for crossover</span>
                      ) : null}
                    </div>
                    <p className="text-sm font-semibold leading-snug">{words(canAct ? w.title : w.ownerTitle)}</p>
                  </div>
                ) : (
                  <p className="mt-3 text-sm text-muted">No active warnings</p>
                )}
                {changes[site.id] ? (
                  <p
                    className={`mt-3 rounded px-2 py-1 text-sm font-semibold ${changes[site.id].earliestDueAt < now ? "bg-alarm text-on-strong" : "bg-warning/20"}`}
                    data-testid="site-changes"
                  >
                    {changes[site.id].count === 1
                      ? "1 temporary change"
                      : `${changes[site.id].count} temporary changes`}{" "}
                    in place for {inPlaceFor(changes[site.id].oldestMadeAt, now)}
                    {changes[site.id].earliestDueAt < now ? " · overdue" : ""}
                  </p>
                ) : null}
                <p className="mt-3 text-sm">
                  {site.status?.unacknowledged ? (
                    <span className="font-semibold" data-testid="site-unack">
                      {site.status.unacknowledged} unacknowledged ·{" "}
                    </span>
                  ) : null}
                  {site.kind} · {site.equipmentCount} pieces of equipment
                </p>
              </Link>
            </li>
          );
        })}
      </ul>
    </section>
  );
}
