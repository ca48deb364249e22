import { requireApiViewer } from "@/app/(auth)/auth";
import { deleteSmsNumber, getSmsNumber, setSmsAlarms } from "@/db/queries/notify";
import { smsAlarmsSchema, smsNumberSchema } from "@/lib/schemas/notify";
import { requireStaff } from "@/lib/server/guards";
import { readJson, route } from "@/lib/server/http";
import { addSmsNumber } from "@/lib/server/notify/use-cases";
import { getDb, requireNotifyPaths } from "@/lib/server/runtime";

// The viewer's own mobile number for alarm texts: set (a code is texted to it), verify, turn
// alarm texts on or off, remove.
export const GET = route(async (request) => {
  const viewer = await requireApiViewer(request);
  requireStaff(viewer);
  return Response.json({ number: getSmsNumber(getDb(), viewer, Date.now()) });
});

export const PUT = route(async (request) => {
  const viewer = await requireApiViewer(request);
  requireStaff(viewer);
  const { phone } = await readJson(request, smsNumberSchema);
  const db = getDb();
  await addSmsNumber(db, requireNotifyPaths(), viewer, phone, Date.now());
  return Response.json({ number: getSmsNumber(db, viewer, Date.now()) });
});

export const PATCH = route(async (request) => {
  const viewer = await requireApiViewer(request);
  requireStaff(viewer);
  const { alarmsEnabled } = await readJson(request, smsAlarmsSchema);
  return Response.json({ number: setSmsAlarms(getDb(), viewer, alarmsEnabled, Date.now()) });
});

export const DELETE = route(async (request) => {
  const viewer = await requireApiViewer(request);
  deleteSmsNumber(getDb(), viewer);
  return new Response(null, { status: 204 });
});
