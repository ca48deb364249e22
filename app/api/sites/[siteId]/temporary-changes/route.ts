import { requireApiViewer } from "@/app/(auth)/auth";
import { canSeeSite } from "@/db/queries/sites";
import { listTemporaryChanges } from "@/db/queries/temporary-changes";
import { notFound } from "@/lib/errors";
import { route } from "@/lib/server/http";
import { serviceContext } from "@/lib/server/visits";

export const dynamic = "force-dynamic";

/** The site's temporary changes still in place, with their plain-words sentence and live check. */
export const GET = route<{ params: Promise<{ siteId: string }> }>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { siteId } = await params;
  const ctx = serviceContext();
  if (!canSeeSite(ctx.db, viewer, siteId)) throw notFound("No such site.");
  return Response.json({ changes: listTemporaryChanges(ctx.db, viewer, { siteId, inPlace: true }, ctx) });
});
