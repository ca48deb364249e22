import { requireApiViewer } from "@/app/(auth)/auth";
import { readJson, route } from "@/lib/server/http";
import { closeVisit, serviceContext } from "@/lib/server/visits";
import { closeVisitSchema } from "@/lib/schemas/service";

export const POST = route<{ params: Promise<{ visitId: string }> }>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const input = await readJson(request, closeVisitSchema);
  return Response.json({ visit: closeVisit(serviceContext(), viewer, (await params).visitId, input) });
});
