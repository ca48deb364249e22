import { requireApiViewer } from "@/app/(auth)/auth";
import { updateIncident } from "@/db/queries/incidents";
import { buildIncidentReview } from "@/lib/server/incidents";
import { readJson, route } from "@/lib/server/http";
import { getDb } from "@/lib/server/runtime";
import { incidentPatchSchema } from "@/lib/schemas/incidents";

type Ctx = { params: Promise<{ incidentId: string }> };

export const GET = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  return Response.json({ review: buildIncidentReview(getDb(), viewer, (await params).incidentId) });
});

export const PATCH = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const patch = await readJson(request, incidentPatchSchema);
  return Response.json({ incident: updateIncident(getDb(), viewer, (await params).incidentId, patch) });
});
