import { requireApiViewer } from "@/app/(auth)/auth";
import { siteModel } from "@/db/queries/points";
import { haystackGrid } from "@/lib/open-formats/haystack";
import { route } from "@/lib/server/http";
import { getDb } from "@/lib/server/runtime";
import { sitePointListParams } from "@/lib/schemas/points";

export const dynamic = "force-dynamic";

/** The site's model as a Project Haystack grid in the JSON encoding (site, equip and point entities). */
export const GET = route<{ params: Promise<{ siteId: string }> }>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { siteId } = sitePointListParams.parse(await params);
  return Response.json(haystackGrid(siteModel(getDb(), viewer, siteId)), {
    headers: { "content-disposition": `attachment; filename="${encodeURIComponent(siteId)}-haystack.json"` },
  });
});
