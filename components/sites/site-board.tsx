"use client";

import Link from "next/link";
import useSWR from "swr";
import type { SiteSummaryDto } from "@/db/queries/sites";
import { fetchJson } from "@/lib/client/fetcher";

export function SiteBoard({ fallback }: { fallback: SiteSummaryDto[] }) {
  const { data, error } = useSWR<{ sites: SiteSummaryDto[] }>("/api/sites", fetchJson, { fallbackData: { sites: fallback } });
  const sites = data?.sites ?? [];
  return (
    <section aria-labelledby="board-title">
      <h1 id="board-title" className="text-2xl font-semibold">
        Plants
      </h1>
      {error ? <p className="mt-2 text-alarm">Could not refresh the board: {error.message}</p> : null}
      {sites.length === 0 ? <p className="mt-4 text-muted">No sites yet.</p> : null}
      <ul className="mt-4 grid gap-3 sm:grid-cols-2 lg:grid-cols-3" data-testid="site-list">
        {sites.map((site) => (
          <li key={site.id}>
            <Link href={`/sites/${site.id}`} className="block rounded-lg border border-line bg-panel p-4 hover:border-ink" data-testid="site-card">
              <div className="flex items-start justify-between gap-2">
                <h2 className="font-semibold">{site.name}</h2>
                {/* Filled by the live status of later work: data freshness and the worst active condition. */}
                <span className="rounded bg-surface px-2 py-0.5 text-xs text-muted" data-testid="site-status">
                  No data yet
                </span>
              </div>
              <p className="mt-1 text-sm text-muted">{site.customer.name}</p>
              <p className="mt-3 text-sm">
                {site.kind} · {site.equipmentCount} pieces of equipment
              </p>
            </Link>
          </li>
        ))}
      </ul>
    </section>
  );
}
