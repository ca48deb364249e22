import type { Metadata } from "next";
import Link from "next/link";
import { listIncidents } from "@/db/queries/incidents";
import { formatDateTime } from "@/lib/client/format";
import { seesAllSites } from "@/lib/auth/viewer";
import { getDb } from "@/lib/server/runtime";
import { incidentQuerySchema } from "@/lib/schemas/incidents";
import { requirePageViewer } from "../../(auth)/auth";

export const dynamic = "force-dynamic";
export const metadata: Metadata = { title: "Incidents" };

const stateWords = { open: "Open", resolved: "Resolved", reviewed: "Reviewed" } as const;

export default async function IncidentsPage({ searchParams }: { searchParams: Promise<Record<string, string>> }) {
  const viewer = await requirePageViewer();
  const q = incidentQuerySchema.safeParse(await searchParams);
  const filter = q.success ? q.data : {};
  const list = listIncidents(getDb(), viewer, { siteId: filter.site, state: filter.state });
  const staff = seesAllSites(viewer);
  return (
    <article>
      <h1 className="mb-1 text-2xl font-semibold">Incidents</h1>
      <p className="mb-4 text-muted">
        {staff
          ? "Related alarms of a site, grouped as they happened. Open one to review its timeline and trends."
          : "Incidents on your sites that your service company has written up for you."}
        {filter.site ? (
          <>
            {" "}
            <Link href="/incidents" className="underline">
              All sites
            </Link>
          </>
        ) : null}
      </p>
      {list.length === 0 ? (
        <p className="text-muted">No incidents{filter.site ? " on this site" : ""}.</p>
      ) : (
        <ul className="flex flex-col gap-2" data-testid="incident-list">
          {list.map((i) => (
            <li key={i.id}>
              <Link
                href={`/incidents/${i.id}`}
                className="flex flex-col gap-1 rounded border border-line bg-panel p-3 hover:bg-surface"
                data-testid="incident-row"
                data-state={i.state}
              >
                <span className="font-semibold">{i.title}</span>
                <span className="text-sm text-muted">
                  {i.siteName} · {formatDateTime(i.startedAtMs, i.siteTimeZone)}
                  {i.endedAtMs ? ` – ${formatDateTime(i.endedAtMs, i.siteTimeZone)}` : " · still lasting"} ·{" "}
                  {stateWords[i.state]}
                  {staff
                    ? ` · ${i.alarmCount} alarm${i.alarmCount === 1 ? "" : "s"}${i.shared ? " · shared" : ""}`
                    : ""}
                </span>
              </Link>
            </li>
          ))}
        </ul>
      )}
    </article>
  );
}
