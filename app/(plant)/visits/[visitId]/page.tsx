import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { onCallCandidates } from "@/db/queries/oncall";
import { getSite } from "@/db/queries/sites";
import { getVisit } from "@/db/queries/visits";
import { VisitView } from "@/components/service/visit-view";
import { canAct } from "@/lib/auth/viewer";
import { serviceContext } from "@/lib/server/visits";
import { requirePageViewer } from "../../../(auth)/auth";

export const metadata: Metadata = { title: "Visit" };
export const dynamic = "force-dynamic";

export default async function VisitPage({ params }: { params: Promise<{ visitId: string }> }) {
  const viewer = await requirePageViewer();
  const ctx = serviceContext();
  const visit = getVisit(ctx.db, viewer, (await params).visitId, ctx);
  if (!visit) notFound();
  const site = getSite(ctx.db, viewer, visit.siteId)!;
  const staff = canAct(viewer);
  return (
    <VisitView
      initial={visit}
      staff={staff}
      equipment={site.equipment.map((e) => ({ id: e.id, tag: e.tag, name: e.name, kind: e.kind }))}
      people={staff ? onCallCandidates(ctx.db).map((p) => ({ id: p.id, name: p.name })) : []}
    />
  );
}
