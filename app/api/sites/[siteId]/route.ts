import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb } from "@/lib/server/runtime";
import { getSite } from "@/db/queries/sites";
import { notFound } from "@/lib/errors";
import { route } from "@/lib/server/http";

export const GET = route<{ params: Promise<{ siteId: string }> }>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { siteId } = await params;
  const site = getSite(getDb(), viewer, siteId);
  if (!site) throw notFound("No such site.");
  return Response.json({ site });
});
