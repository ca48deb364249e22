import { requireApiViewer } from "@/app/(auth)/auth";
import { readJson, route } from "@/lib/server/http";
import { putBackTemporaryChange, serviceContext } from "@/lib/server/visits";
import { putBackSchema } from "@/lib/schemas/service";

export const POST = route<{ params: Promise<{ changeId: string }> }>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const input = await readJson(request, putBackSchema);
  return Response.json({ change: putBackTemporaryChange(serviceContext(), viewer, (await params).changeId, input) });
});
