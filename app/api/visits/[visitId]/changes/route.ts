import { requireApiViewer } from "@/app/(auth)/auth";
import { readJson, route } from "@/lib/server/http";
import { recordTemporaryChange, serviceContext } from "@/lib/server/visits";
import { temporaryChangeSchema } from "@/lib/schemas/service";

export const POST = route<{ params: Promise<{ visitId: string }> }>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const input = await readJson(request, temporaryChangeSchema);
  const change = recordTemporaryChange(serviceContext(), viewer, (await params).visitId, input);
  return Response.json({ change }, { status: 201 });
});
