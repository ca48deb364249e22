import { requireApiViewer } from "@/app/(auth)/auth";
import { requireDrill } from "@/db/queries/drills";
import { route } from "@/lib/server/http";
import { getDb, getRuntime } from "@/lib/server/runtime";

type Ctx = { params: Promise<{ drillId: string }> };

// A drill with its steps and score, and while it runs its live state (the advice only with hints on).
export const GET = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { drillId } = await params;
  const drill = requireDrill(getDb(), viewer, drillId);
  return Response.json({ drill, live: getRuntime()?.drills?.live(viewer, drillId) ?? null });
});
