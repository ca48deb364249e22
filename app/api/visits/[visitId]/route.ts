import { requireApiViewer } from "@/app/(auth)/auth";
import { getVisit } from "@/db/queries/visits";
import { notFound } from "@/lib/errors";
import { readJson, route } from "@/lib/server/http";
import { serviceContext, updateVisit } from "@/lib/server/visits";
import { updateVisitSchema } from "@/lib/schemas/service";

type Ctx = { params: Promise<{ visitId: string }> };

export const GET = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const ctx = serviceContext();
  const visit = getVisit(ctx.db, viewer, (await params).visitId, ctx);
  if (!visit) throw notFound("No such visit.");
  return Response.json({ visit });
});

export const PATCH = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const input = await readJson(request, updateVisitSchema);
  return Response.json({ visit: updateVisit(serviceContext(), viewer, (await params).visitId, input) });
});
