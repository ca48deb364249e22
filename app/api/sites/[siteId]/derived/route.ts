import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb } from "@/lib/server/runtime";
import { canSeeSite } from "@/db/queries/sites";
import { notFound } from "@/lib/errors";
import { route } from "@/lib/server/http";
import { getRuntime } from "@/lib/server/runtime";

const TREND_WINDOW_S = 3600;

// The numbers a technician reasons with, as of the site's latest event time.
export const GET = route<{ params: Promise<{ siteId: string }> }>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { siteId } = await params;
  if (!canSeeSite(getDb(), viewer, siteId)) throw notFound("No such site.");
  const service = getRuntime()?.alarms;
  const snapshot = service?.snapshot(siteId) ?? null;
  const marginTrend = service?.marginTrend(siteId, TREND_WINDOW_S) ?? {};
  return Response.json({ snapshot, marginTrend, marginTrendWindowS: TREND_WINDOW_S });
});
