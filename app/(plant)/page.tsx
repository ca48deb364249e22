import { getDb } from "@/db/client";
import { listSites } from "@/db/queries/sites";
import { SiteBoard } from "@/components/sites/site-board";
import { requirePageViewer } from "../(auth)/auth";

export const dynamic = "force-dynamic";

export default async function BoardPage() {
  const viewer = await requirePageViewer();
  return <SiteBoard fallback={listSites(getDb(), viewer)} />;
}
