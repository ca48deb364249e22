import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb } from "@/lib/server/runtime";
import { listSites } from "@/db/queries/sites";
import { boardStatuses } from "@/lib/server/board/site-status";
import { readJson, route } from "@/lib/server/http";
import { createSite } from "@/lib/server/plant-records";
import { includeRetiredQuery } from "@/lib/schemas/customers";
import { siteSchema } from "@/lib/schemas/sites";

/** Sites in service the viewer may see; `?includeRetired=1` adds retired ones for admins. */
export const GET = route(async (request) => {
  const viewer = await requireApiViewer(request);
  const { includeRetired } = includeRetiredQuery.parse(Object.fromEntries(new URL(request.url).searchParams));
  const db = getDb();
  const sites = listSites(db, viewer, { includeRetired });
  const statuses = boardStatuses(
    db,
    viewer,
    sites.map((s) => s.id),
  );
  return Response.json({ sites: sites.map((s) => ({ ...s, status: statuses.get(s.id) })) });
});

export const POST = route(async (request) => {
  const viewer = await requireApiViewer(request);
  const body = await readJson(request, siteSchema);
  return Response.json({ site: createSite(getDb(), viewer, body) }, { status: 201 });
});
