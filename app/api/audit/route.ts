import { requireApiViewer } from "@/app/(auth)/auth";
import { listAudit } from "@/db/queries/audit";
import { auditQuerySchema } from "@/lib/schemas/audit";
import { requireAdmin } from "@/lib/server/guards";
import { route } from "@/lib/server/http";
import { getDb } from "@/lib/server/runtime";

/** Newest first; `before` (an entry id) pages to older ones, `nextBefore` says where the next page starts. */
export const GET = route(async (request) => {
  const viewer = await requireApiViewer(request);
  requireAdmin(viewer);
  const q = auditQuerySchema.parse(Object.fromEntries(new URL(request.url).searchParams));
  const entries = listAudit(getDb(), viewer, {
    entityType: q.entityType,
    entityId: q.entityId,
    siteId: q.siteId,
    actorId: q.actorId,
    fromMs: q.from,
    toMs: q.to,
    beforeId: q.before,
    limit: q.limit,
  });
  const nextBefore = entries.length === q.limit ? entries[entries.length - 1].id : null;
  return Response.json({ entries, nextBefore });
});
