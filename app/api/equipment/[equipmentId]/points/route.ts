import { requireApiViewer } from "@/app/(auth)/auth";
import { listEquipmentPoints } from "@/db/queries/points";
import { pathParam, route, readJson } from "@/lib/server/http";
import { addPoint } from "@/lib/server/points";
import { getDb } from "@/lib/server/runtime";
import { createPointSchema, equipmentPointsParams } from "@/lib/schemas/points";

export const dynamic = "force-dynamic";
type Ctx = { params: Promise<{ equipmentId: string }> };

export const GET = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { equipmentId } = equipmentPointsParams.parse({ equipmentId: pathParam((await params).equipmentId) });
  return Response.json({ points: listEquipmentPoints(getDb(), viewer, equipmentId) });
});

/** Adds one point: `{ quantity, unit?, expectedIntervalS?, lowLimit?, highLimit? }`, limits in `unit`. 201 `{ point }`. */
export const POST = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { equipmentId } = equipmentPointsParams.parse({ equipmentId: pathParam((await params).equipmentId) });
  const body = await readJson(request, createPointSchema);
  return Response.json({ point: addPoint(getDb(), viewer, equipmentId, body) }, { status: 201 });
});
