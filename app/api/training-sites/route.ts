import { requireApiViewer } from "@/app/(auth)/auth";
import { listTrainingSites } from "@/db/queries/drills";
import { createTrainingSiteSchema } from "@/lib/schemas/drills";
import { requireDrills } from "@/lib/server/drill-access";
import { readJson, route } from "@/lib/server/http";
import { getDb } from "@/lib/server/runtime";

// Training sites: simulated plants that exist only for drills (never notify, never shown to customers).
export const GET = route(async (request) => {
  const viewer = await requireApiViewer(request);
  return Response.json({ sites: listTrainingSites(getDb(), viewer) });
});

export const POST = route(async (request) => {
  const viewer = await requireApiViewer(request);
  const input = await readJson(request, createTrainingSiteSchema);
  return Response.json({ site: await requireDrills().createTrainingSite(viewer, input) }, { status: 201 });
});
