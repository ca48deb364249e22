import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { getDb } from "@/lib/server/runtime";
import { getSite } from "@/db/queries/sites";
import { TrendChart } from "@/components/charts/trend-chart";
import { isQuantityKey, quantities } from "@/lib/quantities";
import { requirePageViewer } from "../../../../../(auth)/auth";

export const metadata: Metadata = { title: "Trend" };
export const dynamic = "force-dynamic";

export default async function PointTrendPage({ params }: { params: Promise<{ siteId: string; pointId: string }> }) {
  const viewer = await requirePageViewer();
  const { siteId, pointId } = await params;
  const site = getSite(getDb(), viewer, siteId);
  if (!site) notFound();
  const id = Number(pointId);
  const found = site.equipment.flatMap((e) => e.points.map((p) => ({ e, p }))).find(({ p }) => p.id === id);
  if (!found || !isQuantityKey(found.p.quantity)) notFound();
  const q = quantities[found.p.quantity];
  return (
    <article className="flex flex-col gap-4">
      <p className="text-sm">
        <Link href={`/sites/${site.id}`} className="underline">
          {site.name}
        </Link>{" "}
        · {found.e.tag}
      </p>
      <h1 className="text-2xl font-semibold">
        {found.e.tag} {q.label}
      </h1>
      <TrendChart
        siteId={site.id}
        pointId={id}
        measure={q.measure}
        unitSystem={viewer.unitSystem}
        label={q.label}
        timeZone={site.timeZone}
      />
    </article>
  );
}
