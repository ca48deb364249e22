import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { getDb } from "@/lib/server/runtime";
import { getSite } from "@/db/queries/sites";
import { LivePoints } from "@/components/sites/live-points";
import { SiteWarnings } from "@/components/sites/site-warnings";
import { TemporaryChangeBanner } from "@/components/service/change-banner";
import { OpenVisitButton } from "@/components/service/open-visit-button";
import { ServiceRequestPanel } from "@/components/service/service-requests";
import { listVisits } from "@/db/queries/visits";
import { listVisitReports } from "@/db/queries/visit-reports";
import { SiteReports } from "@/components/service/site-reports";
import { FilesStrip } from "@/components/files/files-strip";
import { canAct, isAdmin } from "@/lib/auth/viewer";
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

export default async function SitePage({ params }: Props) {
  const viewer = await requirePageViewer();
  const site = getSite(getDb(), viewer, (await params).siteId);
  // A site the viewer may not see looks exactly like one that does not exist.
  if (!site) notFound();
  const staff = canAct(viewer);
  const openVisits = staff ? listVisits(getDb(), viewer, { siteId: site.id, open: true }) : [];
  return (
    <article>
      <header className="mb-4">
        <h1 className="text-2xl font-semibold">{site.name}</h1>
        <p className="text-muted">
          {site.customer.name} · {site.address} · {site.timeZone}
        </p>
        {canAct(viewer) ? (
          <p className="mt-1 flex flex-wrap gap-x-4 text-sm">
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
        ) : null}
      </header>
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
      <SiteWarnings siteId={site.id} canAct={canAct(viewer)} unitSystem={viewer.unitSystem} timeZone={site.timeZone} />
      <h2 className="mb-2 mt-8 text-lg font-semibold">Equipment and points</h2>
      <LivePoints siteId={site.id} equipment={site.equipment} unitSystem={viewer.unitSystem} />
      {staff ? null : <ServiceRequestPanel siteId={site.id} timeZone={site.timeZone} />}
      <SiteReports reports={listVisitReports(getDb(), viewer, { siteId: site.id })} timeZone={site.timeZone} />
      {canAct(viewer) ? (
        <section aria-labelledby="records-title" className="mt-8">
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
    </article>
  );
}
