import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb, getRuntime } from "@/lib/server/runtime";
import { getAlarm } from "@/db/queries/alarms";
import { notFound } from "@/lib/errors";
import { route } from "@/lib/server/http";

export const GET = route<{ params: Promise<{ alarmId: string }> }>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const alarm = getAlarm(getDb(), viewer, (await params).alarmId, getRuntime()?.alarms.latestDetail);
  if (!alarm) throw notFound("No such alarm.");
  return Response.json({ alarm });
});
