import { requireApiViewer } from "@/app/(auth)/auth";
import { listDrills } from "@/db/queries/drills";
import { drillListQuerySchema, startDrillSchema } from "@/lib/schemas/drills";
import { requireDrills } from "@/lib/server/drill-access";
import { readJson, route } from "@/lib/server/http";
import { getDb } from "@/lib/server/runtime";

// Drills, newest first (staff only; a customer gets an empty list), and starting one on a training site.
export const GET = route(async (request) => {
  const viewer = await requireApiViewer(request);
  const q = drillListQuerySchema.parse(Object.fromEntries(new URL(request.url).searchParams));
  const list = listDrills(getDb(), viewer, { traineeId: q.traineeId }).filter(
    (d) => !q.siteId || d.siteId === q.siteId,
  );
  return Response.json({ drills: list });
});

export const POST = route(async (request) => {
  const viewer = await requireApiViewer(request);
  const input = await readJson(request, startDrillSchema);
  return Response.json({ drill: await requireDrills().start(viewer, input) }, { status: 201 });
});
