import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb } from "@/lib/server/runtime";
import { listMail } from "@/db/queries/oncall";
import { route } from "@/lib/server/http";
import { requireAdmin } from "@/lib/server/guards";

export const GET = route(async (request) => {
  const viewer = await requireApiViewer(request);
  requireAdmin(viewer);
  return Response.json({ messages: listMail(getDb()) });
});
