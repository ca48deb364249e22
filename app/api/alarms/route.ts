import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb } from "@/lib/server/runtime";
import { listAlarms } from "@/db/queries/alarms";
import { route } from "@/lib/server/http";
import { alarmQuerySchema } from "@/lib/schemas/alarms";

export const GET = route(async (request) => {
  const viewer = await requireApiViewer(request);
  const q = alarmQuerySchema.parse(Object.fromEntries(new URL(request.url).searchParams));
  const alarms = listAlarms(getDb(), viewer, {
    siteId: q.site,
    states: q.state,
    priority: q.priority,
    includeNormal: q.all === "1",
  });
  return Response.json({ alarms });
});
