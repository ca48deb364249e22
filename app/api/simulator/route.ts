import { requireApiViewer } from "@/app/(auth)/auth";
import { AppError } from "@/lib/errors";
import { route } from "@/lib/server/http";
import { requireAdmin } from "@/lib/server/guards";
import { getRuntime } from "@/lib/server/runtime";
import { scenarios } from "@/simulator/scenarios";

export const GET = route(async (request) => {
  const viewer = await requireApiViewer(request);
  requireAdmin(viewer);
  const simulation = getRuntime()?.simulation;
  if (!simulation)
    throw new AppError("unavailable", "The simulator is not running (demo mode off or LIFTLINE_SIMULATOR=0).");
  const list = Object.entries(scenarios).map(([name, s]) => ({
    name,
    description: s.description,
    durationS: s.defaultDurationS,
  }));
  return Response.json({ sites: simulation.list(), scenarios: list });
});
