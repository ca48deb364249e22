import { requireApiViewer } from "@/app/(auth)/auth";
import { getEquipment } from "@/db/queries/equipment";
import { notFound } from "@/lib/errors";
import { pathParam, readJson, route } from "@/lib/server/http";
import { editEquipment, retireEquipment } from "@/lib/server/plant-records";
import { getDb } from "@/lib/server/runtime";
import { equipmentPatchSchema } from "@/lib/schemas/equipment";

type Ctx = { params: Promise<{ equipmentId: string }> };

/** The record; a chiller's effective limits (value, default or entered, basis, who and when). */
export const GET = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const equipment = getEquipment(getDb(), viewer, pathParam((await params).equipmentId));
  if (!equipment) throw notFound("No such equipment.");
  return Response.json({ equipment });
});

export const PATCH = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const equipmentId = pathParam((await params).equipmentId);
  const body = await readJson(request, equipmentPatchSchema);
  return Response.json({ equipment: editEquipment(getDb(), viewer, equipmentId, body) });
});

export const DELETE = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const equipment = retireEquipment(getDb(), viewer, pathParam((await params).equipmentId));
  return Response.json({ equipment: equipment ?? null, changed: equipment !== null });
});
