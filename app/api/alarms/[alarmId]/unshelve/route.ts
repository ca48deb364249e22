import { requireApiViewer } from "@/app/(auth)/auth";
import { route } from "@/lib/server/http";
import { requireAlarmService } from "@/lib/server/runtime";
import { unshelveSchema } from "@/lib/schemas/alarms";

export const POST = route<{ params: Promise<{ alarmId: string }> }>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  // The body is optional here: an empty POST is a plain unshelve.
  const text = await request.text();
  const { note } = unshelveSchema.parse(text ? JSON.parse(text) : {});
  return Response.json(
    requireAlarmService().command(viewer, (await params).alarmId, { type: "unshelve", note: note || undefined }),
  );
});
