import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { getDb } from "@/lib/server/runtime";
import { getSite } from "@/db/queries/sites";
import { PointListImport } from "@/components/points/point-list-import";
import { isAdmin } from "@/lib/auth/viewer";
import { requirePageViewer } from "../../../../../(auth)/auth";

export const metadata: Metadata = { title: "Point list" };
export const dynamic = "force-dynamic";

export default async function SitePointListPage({ params }: { params: Promise<{ siteId: string }> }) {
  const viewer = await requirePageViewer();
  const site = getSite(getDb(), viewer, (await params).siteId);
  if (!site || !isAdmin(viewer)) notFound();
  const base = `/api/sites/${encodeURIComponent(site.id)}`;
  return (
    <section>
      <p className="text-sm">
        <Link href={`/sites/${site.id}`} className="underline">
          {site.name}
        </Link>
      </p>
      <h1 className="mb-1 text-2xl font-semibold">Point list</h1>
      <p className="mb-2 max-w-prose text-muted">
        Add or change the points of this site&apos;s equipment from one CSV. Points the list does not name are left as
        they are; a gateway&apos;s point map then maps its names onto these points.
      </p>
      <p className="mb-4 flex flex-wrap gap-x-4 text-sm">
        <a href={`${base}/point-list`} className="underline">
          Current point list (CSV)
        </a>
        <a href={`${base}/export/brick`} className="underline">
          Brick model (Turtle)
        </a>
        <a href={`${base}/export/haystack`} className="underline">
          Haystack model (JSON)
        </a>
        <Link href={`/sites/${site.id}/gateways`} className="underline">
          Gateways and point maps
        </Link>
      </p>
      <PointListImport siteId={site.id} />
    </section>
  );
}
