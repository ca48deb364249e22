import { requireApiViewer } from "@/app/(auth)/auth";
import { siteModel } from "@/db/queries/points";
import { brickTurtle } from "@/lib/open-formats/brick";
import { route } from "@/lib/server/http";
import { getDb } from "@/lib/server/runtime";
import { sitePointListParams } from "@/lib/schemas/points";

export const dynamic = "force-dynamic";

/** The site's model as Brick 1.4 Turtle (text/turtle). */
export const GET = route<{ params: Promise<{ siteId: string }> }>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { siteId } = sitePointListParams.parse(await params);
  const turtle = await brickTurtle(siteModel(getDb(), viewer, siteId));
  return new Response(turtle, {
    headers: {
      "content-type": "text/turtle; charset=utf-8",
      "content-disposition": `attachment; filename="${encodeURIComponent(siteId)}.ttl"`,
    },
  });
});
