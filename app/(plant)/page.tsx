import { getDb } from "@/lib/server/runtime";
import { listSites } from "@/db/queries/sites";
import { SiteBoard } from "@/components/sites/site-board";
import { boardStatuses } from "@/lib/server/board/site-status";
import { canAct } from "@/lib/auth/viewer";
import { requirePageViewer } from "../(auth)/auth";

export const dynamic = "force-dynamic";

export default async function BoardPage() {
  const viewer = await requirePageViewer();
  const db = getDb();
  const sites = listSites(db, viewer);
  const statuses = boardStatuses(
    db,
    viewer,
    sites.map((s) => s.id),
  );
  return <SiteBoard fallback={sites.map((s) => ({ ...s, status: statuses.get(s.id) }))} canAct={canAct(viewer)} />;
}
