import { requireApiViewer } from "@/app/(auth)/auth";
import { listVisits } from "@/db/queries/visits";
import { readJson, route } from "@/lib/server/http";
import { getDb } from "@/lib/server/runtime";
import { openVisit, serviceContext } from "@/lib/server/visits";
import { openVisitSchema, visitQuerySchema } from "@/lib/schemas/service";

export const GET = route(async (request) => {
  const viewer = await requireApiViewer(request);
  const q = visitQuerySchema.parse(Object.fromEntries(new URL(request.url).searchParams));
  return Response.json({ visits: listVisits(getDb(), viewer, { siteId: q.site, open: q.open === "1" }) });
});

export const POST = route(async (request) => {
  const viewer = await requireApiViewer(request);
  const input = await readJson(request, openVisitSchema);
  return Response.json({ visit: openVisit(serviceContext(), viewer, input) }, { status: 201 });
});
