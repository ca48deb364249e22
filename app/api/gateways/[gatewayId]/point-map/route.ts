import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb } from "@/lib/server/runtime";
import { getPointMap } from "@/db/queries/gateways";
import { MAX_POINT_MAP_BYTES } from "@/lib/point-map-csv";
import { AppError } from "@/lib/errors";
import { replaceGatewayPointMap } from "@/lib/server/gateways";
import { route } from "@/lib/server/http";
import { gatewayParams } from "@/lib/schemas/gateways";

export const dynamic = "force-dynamic";
type Ctx = { params: Promise<{ gatewayId: string }> };

export const GET = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { gatewayId } = gatewayParams.parse(await params);
  return Response.json({ pointMap: getPointMap(getDb(), viewer, gatewayId) });
});

/**
 * Replaces the point map with a CSV body (`gateway_point,equipment,quantity,unit`).
 * 200 `{ accepted, errors: [] }`, or 400 `{ accepted: 0, errors: [{ line, message }], error }`
 * with nothing applied.
 */
export const PUT = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { gatewayId } = gatewayParams.parse(await params);
  const length = Number(request.headers.get("content-length") ?? 0);
  if (length > MAX_POINT_MAP_BYTES) throw new AppError("payload_too_large", "The point map is larger than 2 MB.");
  const result = replaceGatewayPointMap(getDb(), viewer, gatewayId, await request.text());
  if (result.errors.length > 0) {
    const err = new AppError(
      "bad_request",
      `${result.errors.length} row(s) of the point map are not valid; nothing was changed.`,
    );
    return Response.json({ accepted: 0, errors: result.errors, ...err.toBody() }, { status: err.status });
  }
  return Response.json({ accepted: result.accepted, errors: [] });
});
