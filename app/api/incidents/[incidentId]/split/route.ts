import { requireApiViewer } from "@/app/(auth)/auth";
import { splitIncident } from "@/db/queries/incidents";
import { readJson, route } from "@/lib/server/http";
import { getDb } from "@/lib/server/runtime";
import { splitIncidentSchema } from "@/lib/schemas/incidents";

type Ctx = { params: Promise<{ incidentId: string }> };

export const POST = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { activations, title } = await readJson(request, splitIncidentSchema);
  const incident = splitIncident(getDb(), viewer, (await params).incidentId, activations, title);
  return Response.json({ incident }, { status: 201 });
});
