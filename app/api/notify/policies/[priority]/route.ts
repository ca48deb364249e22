import { requireApiViewer } from "@/app/(auth)/auth";
import { savePolicy } from "@/db/queries/notify";
import { policyParamsSchema, policySchema } from "@/lib/schemas/notify";
import { requireAdmin } from "@/lib/server/guards";
import { readJson, route } from "@/lib/server/http";
import { getDb } from "@/lib/server/runtime";

export const PUT = route<{ params: Promise<{ priority: string }> }>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  requireAdmin(viewer);
  const { priority } = policyParamsSchema.parse(await params);
  const input = await readJson(request, policySchema);
  return Response.json({ policy: savePolicy(getDb(), viewer, priority, input, Date.now()) });
});
