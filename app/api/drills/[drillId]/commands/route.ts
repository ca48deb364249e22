import { requireApiViewer } from "@/app/(auth)/auth";
import { drillCommandBodySchema } from "@/lib/schemas/drills";
import { requireDrills } from "@/lib/server/drill-access";
import { readJson, route } from "@/lib/server/http";

type Ctx = { params: Promise<{ drillId: string }> };

// A trainee's command to the simulated plant, recorded as a step with the advice the rules gave then.
// Only ever reaches a training site's simulated gateway, never a real controller.
export const POST = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { drillId } = await params;
  const action = await readJson(request, drillCommandBodySchema);
  return Response.json({ step: await requireDrills().command(viewer, drillId, action) }, { status: 202 });
});
