import { requireApiViewer } from "@/app/(auth)/auth";
import { readJson, route } from "@/lib/server/http";
import { requireAlarmService } from "@/lib/server/runtime";
import { shelveSchema } from "@/lib/schemas/alarms";

export const POST = route<{ params: Promise<{ alarmId: string }> }>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { minutes, reason } = await readJson(request, shelveSchema);
  return Response.json(
    requireAlarmService().command(viewer, (await params).alarmId, { type: "shelve", minutes, reason }),
  );
});
