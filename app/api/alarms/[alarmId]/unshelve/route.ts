import { requireApiViewer } from "@/app/(auth)/auth";
import { AppError } from "@/lib/errors";
import { route } from "@/lib/server/http";
import { requireAlarmService } from "@/lib/server/runtime";
import { unshelveSchema } from "@/lib/schemas/alarms";

export const POST = route<{ params: Promise<{ alarmId: string }> }>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  // The body is optional here: an empty POST is a plain unshelve; anything else must be valid JSON.
  const text = await request.text();
  let body: unknown = {};
  if (text.trim()) {
    try {
      body = JSON.parse(text);
    } catch {
      throw new AppError("bad_request", "The request body must be JSON.");
    }
  }
  const { note } = unshelveSchema.parse(body);
  return Response.json(
    requireAlarmService().command(viewer, (await params).alarmId, { type: "unshelve", note: note || undefined }),
  );
});
