import { requireApiViewer } from "@/app/(auth)/auth";
import { route } from "@/lib/server/http";
import { restoreSite } from "@/lib/server/plant-records";
import { getDb } from "@/lib/server/runtime";

type Ctx = { params: Promise<{ siteId: string }> };

export const POST = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const site = restoreSite(getDb(), viewer, (await params).siteId);
  return Response.json({ site: site ?? null, changed: site !== null });
});
