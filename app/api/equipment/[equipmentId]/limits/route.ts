import { requireApiViewer } from "@/app/(auth)/auth";
import { pathParam, readJson, route } from "@/lib/server/http";
import { setEquipmentLimits } from "@/lib/server/plant-records";
import { getDb } from "@/lib/server/runtime";
import { chillerLimitsSchema } from "@/lib/schemas/equipment";

type Ctx = { params: Promise<{ equipmentId: string }> };

/** Enters (number) or clears (null) a chiller's limits; the rules use them at once. */
export const PUT = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const equipmentId = pathParam((await params).equipmentId);
  const body = await readJson(request, chillerLimitsSchema);
  return Response.json(setEquipmentLimits(getDb(), viewer, equipmentId, body));
});
