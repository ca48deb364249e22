import { getDb } from "@/lib/server/runtime";
import { SiteBoard } from "@/components/board/site-board";
import { readBoardFirstPage } from "@/lib/server/board/board";
import { canAct, isAdmin } from "@/lib/auth/viewer";
import { redirect } from "next/navigation";
import { parseBoardView } from "@/lib/schemas/board";
import { ServiceRequestQueue } from "@/components/service/service-requests";
import { requirePageViewer } from "../(auth)/auth";

export const dynamic = "force-dynamic";

export default async function BoardPage({
  searchParams,
}: {
  searchParams: Promise<Record<string, string | string[] | undefined>>;
}) {
  const viewer = await requirePageViewer();
  const view = parseBoardView(await searchParams);
  // The page carries the view's first screenful and its counts; the browser fetches the rest.
  const { initial, counts, total } = readBoardFirstPage(getDb(), viewer, view);
  // A new deployment: the administrator's board would be empty, so the checklist comes first.
  if (total === 0 && isAdmin(viewer)) redirect("/admin/setup");
  return (
    <>
      {canAct(viewer) ? <ServiceRequestQueue /> : null}
      <SiteBoard initial={initial} initialCounts={counts} total={total} initialView={view} canAct={canAct(viewer)} />
    </>
  );
}
