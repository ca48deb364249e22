import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb } from "@/lib/server/runtime";
import { addRefrigerantEntry, findChiller, getRefrigerantLog } from "@/db/queries/refrigerant";
import { canAct } from "@/lib/auth/viewer";
import { AppError, notFound } from "@/lib/errors";
import { pathParam, readJson, route } from "@/lib/server/http";
import { refrigerantEntrySchema } from "@/lib/schemas/refrigerant";

type Context = { params: Promise<{ equipmentId: string }> };

export const GET = route<Context>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const log = getRefrigerantLog(getDb(), viewer, pathParam((await params).equipmentId));
  if (!log) throw notFound("No such chiller.");
  return Response.json(log);
});

export const POST = route<Context>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const db = getDb();
  const equipmentId = pathParam((await params).equipmentId);
  if (!findChiller(db, viewer, equipmentId)) throw notFound("No such chiller.");
  if (!canAct(viewer))
    throw new AppError("forbidden", "Only the service company's staff can add to the refrigerant log.");
  const input = await readJson(request, refrigerantEntrySchema);
  return Response.json({ entry: addRefrigerantEntry(db, viewer, equipmentId, input) }, { status: 201 });
});
