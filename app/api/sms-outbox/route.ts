import { requireApiViewer } from "@/app/(auth)/auth";
import { listSmsSinkMessages } from "@/db/queries/notify";
import { requireAdmin } from "@/lib/server/guards";
import { route } from "@/lib/server/http";
import { getDb } from "@/lib/server/runtime";

// The texts the local fake SMS API took (and replies to it), newest first: the Outbox of texts.
export const GET = route(async (request) => {
  const viewer = await requireApiViewer(request);
  requireAdmin(viewer);
  return Response.json({ messages: listSmsSinkMessages(getDb(), viewer) });
});
