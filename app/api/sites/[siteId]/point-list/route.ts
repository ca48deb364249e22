import { requireApiViewer } from "@/app/(auth)/auth";
import { sitePointList } from "@/db/queries/points";
import { AppError } from "@/lib/errors";
import { formatPointListCsv, MAX_POINT_LIST_BYTES } from "@/lib/point-list-csv";
import { route } from "@/lib/server/http";
import { uploadPointList } from "@/lib/server/points";
import { getDb } from "@/lib/server/runtime";
import { pointListQuery, sitePointListParams } from "@/lib/schemas/points";

export const dynamic = "force-dynamic";
type Ctx = { params: Promise<{ siteId: string }> };

/** The site's current point list as CSV (limits in canonical units), the same columns the upload takes. */
export const GET = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { siteId } = sitePointListParams.parse(await params);
  const csv = formatPointListCsv(sitePointList(getDb(), viewer, siteId));
  return new Response(csv, {
    headers: {
      "content-type": "text/csv; charset=utf-8",
      "content-disposition": `attachment; filename="${siteId}-points.csv"`,
    },
  });
});

/**
 * A point-list CSV body (`Content-Type: text/csv`). With `?dryRun=1` (or `?preview=1`) answers
 * the plan and changes nothing; without it applies every row or none.
 * 200 `{ applied, plan, errors: [] }`, or 400 `{ applied: false, plan, errors: [{ line, column, message }], error }`.
 */
export const POST = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { siteId } = sitePointListParams.parse(await params);
  const query = pointListQuery.parse(Object.fromEntries(new URL(request.url).searchParams));
  // text/csv only: a cross-site form can post text/plain without a CORS preflight, never text/csv
  // (OWASP ASVS 5.0 §3.5.2, as readJson does for JSON).
  const mediaType = request.headers.get("content-type")?.split(";")[0].trim().toLowerCase();
  if (mediaType !== "text/csv")
    throw new AppError("unsupported_media_type", "Send the point list as CSV, with Content-Type: text/csv.");
  const length = Number(request.headers.get("content-length") ?? 0);
  if (length > MAX_POINT_LIST_BYTES) throw new AppError("payload_too_large", "The point list is larger than 2 MB.");
  const result = uploadPointList(getDb(), viewer, siteId, await request.text(), {
    apply: !(query.dryRun || query.preview),
  });
  if (result.errors.length > 0) {
    const err = new AppError(
      "bad_request",
      `${new Set(result.errors.map((e) => e.line)).size} line(s) of the point list are not valid; nothing was changed.`,
    );
    return Response.json({ ...result, ...err.toBody() }, { status: err.status });
  }
  return Response.json(result);
});
