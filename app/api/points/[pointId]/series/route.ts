import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb } from "@/lib/server/runtime";
import { getSeries } from "@/db/queries/readings";
import { AppError } from "@/lib/errors";
import { loadConfig } from "@/lib/server/config";
import { route } from "@/lib/server/http";
import { pointParamsSchema as paramsSchema, seriesQuerySchema as querySchema } from "@/lib/schemas/readings";

export const dynamic = "force-dynamic";

const MAX_SPAN_MS = 2 * 366 * 86_400_000;

/** `?from&to` as ISO 8601 or ms since epoch (default: the last hour); at most maxPoints buckets. */
export const GET = route<{ params: Promise<{ pointId: string }> }>(
  async (request, { params }) => {
    const viewer = await requireApiViewer(request);
    const { pointId } = paramsSchema.parse(await params);
    const q = querySchema.parse(Object.fromEntries(new URL(request.url).searchParams));
    const now = Date.now();
    const toMs = q.to ?? now;
    const fromMs = q.from ?? toMs - 3_600_000;
    if (fromMs >= toMs) throw new AppError("bad_request", "`from` must be before `to`.");
    if (toMs - fromMs > MAX_SPAN_MS) throw new AppError("bad_request", "The range can be at most two years.");
    const rawRetentionMs = loadConfig().RAW_RETENTION_DAYS * 86_400_000;
    return Response.json({
      series: getSeries(
        getDb(),
        viewer,
        pointId,
        { fromMs, toMs, maxPoints: q.maxPoints },
        { nowMs: now, rawRetentionMs },
      ),
    });
  },
  { rateLimit: "trends" },
);
