import { requireApiViewer } from "@/app/(auth)/auth";
import { listIncidents } from "@/db/queries/incidents";
import { route } from "@/lib/server/http";
import { getDb } from "@/lib/server/runtime";
import { incidentQuerySchema } from "@/lib/schemas/incidents";

export const GET = route(async (request) => {
  const viewer = await requireApiViewer(request);
  const q = incidentQuerySchema.parse(Object.fromEntries(new URL(request.url).searchParams));
  return Response.json({ incidents: listIncidents(getDb(), viewer, { siteId: q.site, state: q.state }) });
});
