import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb } from "@/lib/server/runtime";
import { getSite } from "@/db/queries/sites";
import { notFound } from "@/lib/errors";
import { readJson, route } from "@/lib/server/http";
import { editSite, retireSite } from "@/lib/server/plant-records";
import { includeRetiredQuery } from "@/lib/schemas/customers";
import { sitePatchSchema } from "@/lib/schemas/sites";

type Ctx = { params: Promise<{ siteId: string }> };

export const GET = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { siteId } = await params;
  const { includeRetired } = includeRetiredQuery.parse(Object.fromEntries(new URL(request.url).searchParams));
  const site = getSite(getDb(), viewer, siteId, { includeRetired });
  if (!site) throw notFound("No such site.");
  return Response.json({ site });
});

export const PATCH = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { siteId } = await params;
  const body = await readJson(request, sitePatchSchema);
  return Response.json({ site: editSite(getDb(), viewer, siteId, body) });
});

/** Retires the site: history kept, off the board, rules stopped, gateways refused. */
export const DELETE = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { siteId } = await params;
  const db = getDb();
  const site = retireSite(db, viewer, siteId);
  return Response.json({ site: site ?? null, changed: site !== null });
});
