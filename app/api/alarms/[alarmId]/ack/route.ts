import { requireApiViewer } from "@/app/(auth)/auth";
import { readJson, route } from "@/lib/server/http";
import { requireAlarmService } from "@/lib/server/runtime";
import { ackSchema } from "@/lib/schemas/alarms";

export const POST = route<{ params: Promise<{ alarmId: string }> }>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { note } = await readJson(request, ackSchema);
  const result = requireAlarmService().command(viewer, (await params).alarmId, {
    type: "acknowledge",
    note: note || undefined,
  });
  return Response.json(result);
});
