import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { getDb } from "@/lib/server/runtime";
import { getSite } from "@/db/queries/sites";
import { LivePoints } from "@/components/sites/live-points";
import { SiteAlarms, SitePlantNumbers } from "@/components/sites/site-warnings";
import { SiteStatusLine } from "@/components/sites/site-status-line";
import { LivePlantOverview } from "@/components/plant-overview/live-plant-overview";
import { TemporaryChangeBanner } from "@/components/service/change-banner";
import { OpenVisitButton } from "@/components/service/open-visit-button";
import { ServiceRequestPanel } from "@/components/service/service-requests";
import { listVisits } from "@/db/queries/visits";
import { listVisitReports } from "@/db/queries/visit-reports";
import { SiteReports } from "@/components/service/site-reports";
import { FilesStrip } from "@/components/files/files-strip";
import { canAct, isAdmin } from "@/lib/auth/viewer";
import { overviewLayout } from "@/lib/plant/overview-layout";
import { overviewInputs, pointsView } from "@/lib/plant/site-page-view";
import Link from "next/link";
import { DrillControls } from "@/components/drills/drill-controls";
import { requirePageViewer } from "../../../(auth)/auth";

export const dynamic = "force-dynamic";

type Props = { params: Promise<{ siteId: string }> };

export async function generateMetadata({ params }: Props): Promise<Metadata> {
  const viewer = await requirePageViewer();
  const site = getSite(getDb(), viewer, (await params).siteId);
  return { title: site?.name ?? "Not found" };
}

// Sections sit below the sticky in-page navigation when jumped to.
const section = "scroll-mt-14";

export default async function SitePage({ params }: Props) {
  const viewer = await requirePageViewer();
  const site = getSite(getDb(), viewer, (await params).siteId);
  // A site the viewer may not see looks exactly like one that does not exist.
  if (!site) notFound();
  const staff = canAct(viewer);
  const openVisits = staff ? listVisits(getDb(), viewer, { siteId: site.id, open: true }) : [];
  const inputs = overviewInputs(site.equipment);
  const nav = [
    ["overview", "Overview"],
    ["alarms", "Alarms"],
    ...(staff ? [["numbers", "Numbers"]] : []),
    ["equipment", "Equipment"],
    [staff ? "records" : "service", staff ? "Files" : "Service"],
  ];
  return (
    <article>
      <header className="mb-3">
        <h1 className="text-2xl font-semibold leading-tight">{site.name}</h1>
        <p className="truncate text-sm text-muted">
          {site.customer.name} · {site.address}
        </p>
        <SiteStatusLine siteId={site.id} canAct={staff} />
        <p className="mt-1 flex flex-wrap gap-x-4 text-sm">
          <Link href={`/incidents?site=${site.id}`} className="underline" data-testid="site-incidents-link">
            Incidents{staff ? "" : " written up for you"}
          </Link>
          <Link href={`/sites/${site.id}/replay`} className="underline" data-testid="replay-link">
            Replay a past window
          </Link>
        </p>
      </header>
      <nav
        aria-label="On this page"
        className="sticky top-0 z-10 -mx-4 mb-4 flex flex-wrap gap-x-4 gap-y-1 border-b border-line bg-surface px-4 py-2 text-sm"
      >
        {nav.map(([id, label]) => (
          <a key={id} href={`#${id}`} className="font-semibold underline-offset-2 hover:underline">
            {label}
          </a>
        ))}
      </nav>
      {staff ? <DrillControls siteId={site.id} /> : null}
      <TemporaryChangeBanner siteId={site.id} staff={staff} timeZone={site.timeZone} />
      {staff ? (
        <section className="mb-4 flex flex-col gap-2" aria-label="Visits">
          {openVisits.map((v) => (
            <Link key={v.id} href={`/visits/${v.id}`} className="text-sm font-semibold underline">
              Open visit: {v.technician.name}, {v.mode === "remote" ? "remote" : "on site"}
            </Link>
          ))}
          <OpenVisitButton siteId={site.id} />
        </section>
      ) : null}
      <section id="overview" aria-labelledby="overview-title" className={`mb-6 ${section}`}>
        <h2 id="overview-title" className="mb-2 text-lg font-semibold">
          Plant overview
        </h2>
        <LivePlantOverview
          siteId={site.id}
          siteName={site.name}
          narrow={overviewLayout(inputs, "narrow")}
          wide={overviewLayout(inputs, "wide")}
          unitSystem={viewer.unitSystem}
        />
      </section>
      <div id="alarms" className={`mb-6 ${section}`}>
        <SiteAlarms siteId={site.id} canAct={staff} unitSystem={viewer.unitSystem} timeZone={site.timeZone} />
      </div>
      {staff ? (
        <div id="numbers" className={`mb-6 ${section}`}>
          <SitePlantNumbers siteId={site.id} unitSystem={viewer.unitSystem} timeZone={site.timeZone} />
        </div>
      ) : null}
      <section id="equipment" aria-labelledby="equipment-title" className={`mb-6 ${section}`}>
        <h2 id="equipment-title" className="mb-2 text-lg font-semibold">
          Equipment and points
        </h2>
        <LivePoints
          siteId={site.id}
          equipment={pointsView(site.equipment, staff)}
          unitSystem={viewer.unitSystem}
          showIdentifiers={staff}
        />
      </section>
      {staff ? null : (
        <div id="service" className={section}>
          <ServiceRequestPanel siteId={site.id} timeZone={site.timeZone} />
        </div>
      )}
      <SiteReports reports={listVisitReports(getDb(), viewer, { siteId: site.id })} timeZone={site.timeZone} />
      {staff ? (
        <section id="records" aria-labelledby="records-title" className={`mt-8 ${section}`}>
          <h2 id="records-title" className="mb-2 text-lg font-semibold">
            Photos, files and refrigerant logs
          </h2>
          <p className="mb-3 flex flex-wrap gap-x-4 text-sm">
            {site.equipment
              .filter((e) => e.kind === "chiller")
              .map((e) => (
                <Link
                  key={e.id}
                  href={`/sites/${site.id}/equipment/${encodeURIComponent(e.id)}/refrigerant`}
                  className="underline"
                >
                  Refrigerant log {e.tag}
                </Link>
              ))}
          </p>
          <FilesStrip siteId={site.id} canAct />
        </section>
      ) : null}
      {staff ? (
        <section aria-labelledby="tools-title" className="mt-8">
          <h2 id="tools-title" className="mb-2 text-lg font-semibold">
            Site settings
          </h2>
          <p className="flex flex-wrap gap-x-4 gap-y-1 text-sm">
            <Link href={`/sites/${site.id}/rules`} className="underline">
              Rule settings
            </Link>
            {isAdmin(viewer) ? (
              <>
                <Link href={`/sites/${site.id}/setup`} className="underline">
                  Site setup and equipment
                </Link>
                <Link href={`/sites/${site.id}/points/import`} className="underline">
                  Point list and exports
                </Link>
                <Link href={`/sites/${site.id}/gateways`} className="underline">
                  Gateways and point maps
                </Link>
              </>
            ) : null}
          </p>
          <p className="mt-1 text-xs text-muted">{site.timeZone} site time</p>
        </section>
      ) : null}
    </article>
  );
}
