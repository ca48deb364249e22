import { getDb } from "@/lib/server/runtime";
import { listSites } from "@/db/queries/sites";
import { SiteBoard } from "@/components/sites/site-board";
import { boardStatuses } from "@/lib/server/board/site-status";
import { canAct, isAdmin } from "@/lib/auth/viewer";
import { redirect } from "next/navigation";
import { inPlaceBySite } from "@/db/queries/temporary-changes";
import { ServiceRequestQueue } from "@/components/service/service-requests";
import { requirePageViewer } from "../(auth)/auth";

export const dynamic = "force-dynamic";

export default async function BoardPage() {
  const viewer = await requirePageViewer();
  const db = getDb();
  const sites = listSites(db, viewer);
  // A new deployment: the administrator's board would be empty, so the checklist comes first.
  if (sites.length === 0 && isAdmin(viewer)) redirect("/admin/setup");
  const statuses = boardStatuses(
    db,
    viewer,
    sites.map((s) => s.id),
  );
  const changes = inPlaceBySite(
    db,
    viewer,
    sites.map((s) => s.id),
  );
  return (
    <>
      {canAct(viewer) ? <ServiceRequestQueue /> : null}
      <SiteBoard
        fallback={sites.map((s) => ({ ...s, status: statuses.get(s.id) }))}
        canAct={canAct(viewer)}
        changes={Object.fromEntries(changes)}
      />
    </>
  );
}
