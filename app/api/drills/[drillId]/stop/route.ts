import { requireApiViewer } from "@/app/(auth)/auth";
import { requireDrill } from "@/db/queries/drills";
import { requireDrills } from "@/lib/server/drill-access";
import { route } from "@/lib/server/http";
import { getDb } from "@/lib/server/runtime";

type Ctx = { params: Promise<{ drillId: string }> };

// Ends a running drill now; it is scored as it stands (outcome "stopped").
export const POST = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { drillId } = await params;
  requireDrill(getDb(), viewer, drillId);
  await requireDrills().stop(viewer, drillId);
  return Response.json({ drill: requireDrill(getDb(), viewer, drillId) });
});
