import { requireApiViewer } from "@/app/(auth)/auth";
import { listPushDevices } from "@/db/queries/notify";
import { pushSubscriptionSchema } from "@/lib/schemas/notify";
import { requireStaff } from "@/lib/server/guards";
import { readJson, route } from "@/lib/server/http";
import { addPushDevice } from "@/lib/server/notify/use-cases";
import { getDb, requireNotifyPaths } from "@/lib/server/runtime";

// A person's own devices only: alarms are pushed to the people on call, who are staff.
export const GET = route(async (request) => {
  const viewer = await requireApiViewer(request);
  requireStaff(viewer);
  return Response.json({ devices: listPushDevices(getDb(), viewer) });
});

export const POST = route(async (request) => {
  const viewer = await requireApiViewer(request);
  requireStaff(viewer);
  const input = await readJson(request, pushSubscriptionSchema);
  const device = addPushDevice(getDb(), requireNotifyPaths(), viewer, input);
  return Response.json({ device }, { status: 201 });
});
