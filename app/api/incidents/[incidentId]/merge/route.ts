import { requireApiViewer } from "@/app/(auth)/auth";
import { mergeIncidents } from "@/db/queries/incidents";
import { readJson, route } from "@/lib/server/http";
import { getDb } from "@/lib/server/runtime";
import { mergeIncidentSchema } from "@/lib/schemas/incidents";

type Ctx = { params: Promise<{ incidentId: string }> };

export const POST = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { otherIncidentId } = await readJson(request, mergeIncidentSchema);
  return Response.json({ incident: mergeIncidents(getDb(), viewer, (await params).incidentId, otherIncidentId) });
});
