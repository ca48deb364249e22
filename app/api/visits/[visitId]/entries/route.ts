import { requireApiViewer } from "@/app/(auth)/auth";
import { readJson, route } from "@/lib/server/http";
import { addVisitEntry, serviceContext } from "@/lib/server/visits";
import { visitEntrySchema } from "@/lib/schemas/service";

export const POST = route<{ params: Promise<{ visitId: string }> }>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const input = await readJson(request, visitEntrySchema);
  return Response.json(
    { visit: addVisitEntry(serviceContext(), viewer, (await params).visitId, input) },
    { status: 201 },
  );
});
