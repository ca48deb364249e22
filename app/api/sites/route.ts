import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb } from "@/lib/server/runtime";
import { listSites } from "@/db/queries/sites";
import { boardStatuses } from "@/lib/server/board/site-status";
import { route } from "@/lib/server/http";

export const GET = route(async (request) => {
  const viewer = await requireApiViewer(request);
  const db = getDb();
  const sites = listSites(db, viewer);
  const statuses = boardStatuses(
    db,
    viewer,
    sites.map((s) => s.id),
  );
  return Response.json({ sites: sites.map((s) => ({ ...s, status: statuses.get(s.id) })) });
});
