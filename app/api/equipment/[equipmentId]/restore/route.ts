import { requireApiViewer } from "@/app/(auth)/auth";
import { pathParam, route } from "@/lib/server/http";
import { restoreEquipment } from "@/lib/server/plant-records";
import { getDb } from "@/lib/server/runtime";

type Ctx = { params: Promise<{ equipmentId: string }> };

export const POST = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const equipment = restoreEquipment(getDb(), viewer, pathParam((await params).equipmentId));
  return Response.json({ equipment: equipment ?? null, changed: equipment !== null });
});
