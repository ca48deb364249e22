import { requireApiViewer } from "@/app/(auth)/auth";
import { AppError, notFound } from "@/lib/errors";
import { readJson, route } from "@/lib/server/http";
import { requireAdmin } from "@/lib/server/guards";
import { getRuntime } from "@/lib/server/runtime";
import { drillActionSchema } from "@/simulator/actions-schema";

// A training drill sent to a simulated plant over its gateway's command topic. Liftline never
// writes to real controllers: this route only reaches the simulated gateways of demo sites.
export const POST = route<{ params: Promise<{ siteId: string }> }>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  requireAdmin(viewer);
  const { siteId } = await params;
  const runtime = getRuntime();
  const site = runtime?.simulation?.list().find((s) => s.siteId === siteId);
  if (!site) throw notFound("No such simulated site.");
  if (!runtime?.sendGatewayCommand) throw new AppError("unavailable", "Commands cannot be sent in this mode.");
  const action = await readJson(request, drillActionSchema);
  await runtime.sendGatewayCommand(site.gatewayId, { id: `drill-${Date.now()}`, action });
  return Response.json({ sent: action }, { status: 202 });
});
