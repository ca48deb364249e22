import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb } from "@/lib/server/runtime";
import { getSiteLatest } from "@/db/queries/readings";
import { route } from "@/lib/server/http";
import { getRuntime } from "@/lib/server/runtime";

export const dynamic = "force-dynamic";

/** The latest value of every point of the site with its age and stale flag, and the site's data status. */
export const GET = route<{ params: Promise<{ siteId: string }> }>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { siteId } = await params;
  return Response.json({ latest: getSiteLatest(getDb(), viewer, siteId, Date.now(), getRuntime()?.latestValue) });
});
