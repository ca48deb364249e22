import { requireApiViewer } from "@/app/(auth)/auth";
import { getAlarm } from "@/db/queries/alarms";
import { listDeliveries } from "@/db/queries/notify";
import { notFound } from "@/lib/errors";
import { route } from "@/lib/server/http";
import { getDb } from "@/lib/server/runtime";

// Who was told about the alarm, on which path, and what became of it. Customers see the alarm but
// not the list (it names people and their numbers): an empty list for them.
export const GET = route<{ params: Promise<{ alarmId: string }> }>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const db = getDb();
  const alarmId = (await params).alarmId;
  if (!getAlarm(db, viewer, alarmId)) throw notFound("No such alarm.");
  return Response.json({ deliveries: listDeliveries(db, viewer, alarmId) });
});
