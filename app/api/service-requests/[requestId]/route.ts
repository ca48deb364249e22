import { requireApiViewer } from "@/app/(auth)/auth";
import { getServiceRequest } from "@/db/queries/service-requests";
import { notFound } from "@/lib/errors";
import { readJson, route } from "@/lib/server/http";
import { getDb } from "@/lib/server/runtime";
import { moveServiceRequest } from "@/lib/server/service-requests";
import { serviceContext } from "@/lib/server/visits";
import { updateServiceRequestSchema } from "@/lib/schemas/service";

type Ctx = { params: Promise<{ requestId: string }> };

export const GET = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const found = getServiceRequest(getDb(), viewer, (await params).requestId);
  if (!found) throw notFound("No such service request.");
  return Response.json({ request: found });
});

export const PATCH = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const input = await readJson(request, updateServiceRequestSchema);
  const updated = moveServiceRequest(serviceContext(), viewer, (await params).requestId, input);
  return Response.json({ request: updated });
});
