import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb } from "@/lib/server/runtime";
import { addNote, findAlarmRef } from "@/db/queries/alarms";
import { canAct } from "@/lib/auth/viewer";
import { AppError, notFound } from "@/lib/errors";
import { readJson, route } from "@/lib/server/http";
import { noteSchema } from "@/lib/schemas/alarms";

export const POST = route<{ params: Promise<{ alarmId: string }> }>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const db = getDb();
  const ref = findAlarmRef(db, viewer, (await params).alarmId);
  if (!ref) throw notFound("No such alarm.");
  if (!canAct(viewer)) throw new AppError("forbidden", "Only the service company's staff can add notes.");
  const { text, visibility } = await readJson(request, noteSchema);
  return Response.json({ note: addNote(db, viewer, ref.id, text, visibility) }, { status: 201 });
});
