import { requireApiViewer } from "@/app/(auth)/auth";
import { listPolicies } from "@/db/queries/notify";
import { route } from "@/lib/server/http";
import { getDb } from "@/lib/server/runtime";

export const GET = route(async (request) => {
  const viewer = await requireApiViewer(request);
  return Response.json({ policies: listPolicies(getDb(), viewer) });
});
