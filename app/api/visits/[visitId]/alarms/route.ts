import { requireApiViewer } from "@/app/(auth)/auth";
import { readJson, route } from "@/lib/server/http";
import { linkAlarmToVisit, serviceContext } from "@/lib/server/visits";
import { linkAlarmSchema } from "@/lib/schemas/service";

export const POST = route<{ params: Promise<{ visitId: string }> }>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { alarmId } = await readJson(request, linkAlarmSchema);
  return Response.json({ visit: linkAlarmToVisit(serviceContext(), viewer, (await params).visitId, alarmId) });
});
