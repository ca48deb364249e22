import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { listEquipment } from "@/db/queries/equipment";
import { getSiteRecord } from "@/db/queries/sites";
import { isAdmin } from "@/lib/auth/viewer";
import { getDb } from "@/lib/server/runtime";
import { EquipmentForm } from "@/components/equipment/equipment-form";
import { EquipmentTable } from "@/components/equipment/equipment-table";
import { SiteForm } from "@/components/sites/site-form";
import { SiteRetirement } from "@/components/sites/site-retirement";
import { formatDateTime } from "@/lib/client/format";
import { requirePageViewer } from "../../../../(auth)/auth";

export const metadata: Metadata = { title: "Site setup" };
export const dynamic = "force-dynamic";

export default async function SiteSetupPage({ params }: { params: Promise<{ siteId: string }> }) {
  const viewer = await requirePageViewer();
  const db = getDb();
  const site = getSiteRecord(db, viewer, (await params).siteId);
  // Not an admin's page for anyone else; a site the viewer may not see does not exist.
  if (!site || !isAdmin(viewer)) notFound();
  const equipment = listEquipment(db, viewer, site.id, { includeRetired: true });
  const retired = site.retiredAtMs !== null;
  const chillerTags = equipment.filter((e) => e.kind === "chiller" && !e.retiredAtMs).map((e) => e.tag);
  const siteHref = `/sites/${encodeURIComponent(site.id)}`;
  return (
    <section className="flex flex-col gap-6">
      <div>
        <p className="flex flex-wrap gap-x-2 text-sm">
          <Link href={`/admin/customers/${encodeURIComponent(site.customer.id)}`} className="underline">
            {site.customer.name}
          </Link>
          <span aria-hidden>›</span>
          <Link href={siteHref} className="underline">
            {site.name}
          </Link>
        </p>
        <h1 className="text-2xl font-semibold">Set up {site.name}</h1>
        {retired ? (
          <p className="mt-1 text-sm text-alarm">
            Retired {formatDateTime(site.retiredAtMs, site.timeZone)} (site time): off the board, rules stopped,
            gateways refused.
          </p>
        ) : null}
        <nav aria-label="Site setup" className="mt-2 flex flex-wrap gap-x-4 gap-y-1 text-sm">
          <Link href={`${siteHref}/points/import`} className="underline">
            Import a point list (CSV)
          </Link>
          <Link href={`${siteHref}/gateways`} className="underline">
            Gateways and point maps
          </Link>
          <a href={`/api/sites/${encodeURIComponent(site.id)}/export/brick`} className="underline">
            Export as Brick (Turtle)
          </a>
          <a href={`/api/sites/${encodeURIComponent(site.id)}/export/haystack`} className="underline">
            Export as Haystack (JSON)
          </a>
        </nav>
      </div>
      <div className="flex flex-col gap-2">
        <h2 className="text-lg font-semibold">Equipment</h2>
        <EquipmentTable
          siteId={site.id}
          rows={equipment.map((e) => ({
            id: e.id,
            tag: e.tag,
            kind: e.kind,
            name: e.name,
            serves: e.serves,
            retired: e.retiredAtMs !== null,
          }))}
        />
      </div>
      {retired ? null : (
        <div className="flex flex-col gap-2">
          <h2 className="text-lg font-semibold">Add equipment</h2>
          <EquipmentForm siteId={site.id} unitSystem={viewer.unitSystem} chillerTags={chillerTags} />
        </div>
      )}
      <div className="flex flex-col gap-2">
        <h2 className="text-lg font-semibold">Site details</h2>
        {retired ? null : <SiteForm customerId={site.customer.id} existing={site} />}
      </div>
      <SiteRetirement siteId={site.id} name={site.name} retired={retired} />
    </section>
  );
}
