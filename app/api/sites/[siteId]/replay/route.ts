import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb } from "@/lib/server/runtime";
import { route } from "@/lib/server/http";
import { loadReplayWindow } from "@/lib/server/replay";
import { replayQuerySchema, replayWindow, siteParamsSchema } from "@/lib/schemas/replay";
import { AppError } from "@/lib/errors";

export const dynamic = "force-dynamic";

/** A window of the site's stored readings (per point, as columns) and its recorded alarm transitions. */
export const GET = route<{ params: Promise<{ siteId: string }> }>(
  async (request, { params }) => {
    const viewer = await requireApiViewer(request);
    const { siteId } = siteParamsSchema.parse(await params);
    const window = replayWindow(
      replayQuerySchema.parse(Object.fromEntries(new URL(request.url).searchParams)),
      Date.now(),
    );
    if ("error" in window) throw new AppError("bad_request", window.error);
    const { fromMs, toMs } = window;
    return Response.json({ replay: loadReplayWindow(getDb(), viewer, siteId, fromMs, toMs) });
  },
  { rateLimit: "trends" },
);
