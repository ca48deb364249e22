import { requireApiViewer } from "@/app/(auth)/auth";
import { getPoint } from "@/db/queries/points";
import { notFound } from "@/lib/errors";
import { route, readJson } from "@/lib/server/http";
import { editPoint, removePoint } from "@/lib/server/points";
import { getDb } from "@/lib/server/runtime";
import { deletePointQuery, pointParams, updatePointSchema } from "@/lib/schemas/points";

export const dynamic = "force-dynamic";
type Ctx = { params: Promise<{ pointId: string }> };

export const GET = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { pointId } = pointParams.parse(await params);
  const point = getPoint(getDb(), viewer, pointId);
  if (!point) throw notFound("No such point.");
  return Response.json({ point });
});

/** `{ unit?, expectedIntervalS?, lowLimit?, highLimit? }`: limits in `unit` (default canonical), null clears one. */
export const PATCH = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { pointId } = pointParams.parse(await params);
  const body = await readJson(request, updatePointSchema);
  return Response.json({ point: editPoint(getDb(), viewer, pointId, body) });
});

/**
 * 204. 409 while a gateway point map feeds the point, and while it has stored readings unless
 * `?discardHistory=1` (they are deleted with it).
 */
export const DELETE = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { pointId } = pointParams.parse(await params);
  const { discardHistory } = deletePointQuery.parse(Object.fromEntries(new URL(request.url).searchParams));
  removePoint(getDb(), viewer, pointId, { discardHistory });
  return new Response(null, { status: 204 });
});
