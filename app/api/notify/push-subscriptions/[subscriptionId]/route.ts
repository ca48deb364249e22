import { requireApiViewer } from "@/app/(auth)/auth";
import { deletePushDevice } from "@/db/queries/notify";
import { route } from "@/lib/server/http";
import { getDb } from "@/lib/server/runtime";

// Another person's device answers 404, the same as one that does not exist.
export const DELETE = route<{ params: Promise<{ subscriptionId: string }> }>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  deletePushDevice(getDb(), viewer, (await params).subscriptionId);
  return new Response(null, { status: 204 });
});
