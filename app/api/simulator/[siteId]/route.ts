import { requireApiViewer } from "@/app/(auth)/auth";
import { AppError, notFound } from "@/lib/errors";
import { readJson, route } from "@/lib/server/http";
import { requireAdmin } from "@/lib/server/guards";
import { getRuntime } from "@/lib/server/runtime";
import { startRunSchemaFor } from "@/lib/schemas/simulator";
import { scenarioNames } from "@/simulator/scenarios";

type Ctx = { params: Promise<{ siteId: string }> };

const startRunSchema = startRunSchemaFor(scenarioNames);

function simulationFor(siteId: string) {
  const simulation = getRuntime()?.simulation;
  if (!simulation)
    throw new AppError("unavailable", "The simulator is not running (demo mode off or LIFTLINE_SIMULATOR=0).");
  if (!simulation.list().some((s) => s.siteId === siteId)) throw notFound("No such simulated site.");
  return simulation;
}

export const POST = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  requireAdmin(viewer);
  const { siteId } = await params;
  const simulation = simulationFor(siteId);
  const { scenario, speed, seed } = await readJson(request, startRunSchema);
  return Response.json({ site: await simulation.start(siteId, scenario, speed, seed) });
});

export const DELETE = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  requireAdmin(viewer);
  const { siteId } = await params;
  await simulationFor(siteId).stop(siteId);
  return new Response(null, { status: 204 });
});
