import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb } from "@/db/client";
import { getPointMap, replacePointMap } from "@/db/queries/gateways";
import { notifyGatewayChanged } from "@/gateway/link";
import { MAX_POINT_MAP_BYTES, parsePointMapCsv } from "@/gateway/point-map-csv";
import { AppError } from "@/lib/errors";
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
  const text = await request.text();
  if (text.length > MAX_POINT_MAP_BYTES) throw new AppError("payload_too_large", "The point map is larger than 2 MB.");
  const { rows, errors } = parsePointMapCsv(text);
  const result = replacePointMap(getDb(), viewer, gatewayId, rows, errors);
  if (result.errors.length > 0) {
    const err = new AppError("bad_request", `${result.errors.length} row(s) of the point map are not valid; nothing was changed.`);
    return Response.json({ accepted: 0, errors: result.errors, ...err.toBody() }, { status: err.status });
  }
  notifyGatewayChanged(gatewayId, "point_map");
  return Response.json({ accepted: result.accepted, errors: [] });
});
