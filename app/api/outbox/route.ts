import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb, getRuntime } from "@/lib/server/runtime";
import { listMail } from "@/db/queries/oncall";
import { route } from "@/lib/server/http";
import { requireAdmin } from "@/lib/server/guards";

export const GET = route(async (request) => {
  const viewer = await requireApiViewer(request);
  requireAdmin(viewer);
  // Messages held in memory (the database could not be written) first: they are the newest.
  return Response.json({ messages: [...(getRuntime()?.heldMail() ?? []), ...listMail(getDb())] });
});
