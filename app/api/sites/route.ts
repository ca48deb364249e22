import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb } from "@/db/client";
import { listSites } from "@/db/queries/sites";
import { route } from "@/lib/server/http";

export const GET = route(async (request) => {
  const viewer = await requireApiViewer(request);
  return Response.json({ sites: listSites(getDb(), viewer) });
});
