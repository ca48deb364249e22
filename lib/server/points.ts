import type { Db } from "@/db/client";
import { deletePoint, getPoint, importPointList, insertPoint, updatePoint } from "@/db/queries/points";
import type { Viewer } from "@/lib/auth/viewer";
import type { PointListResultDto } from "@/lib/dto/points";
import { AppError, notFound } from "@/lib/errors";
import { MAX_POINT_LIST_BYTES, parsePointListCsv } from "@/lib/point-list-csv";
import { canonicalLimits, type CreatePointBody, type UpdatePointBody } from "@/lib/schemas/points";
import { getRuntime } from "./runtime";

// Point administration as whole acts: each writes (with its audit entry) and tells the running
// gateway side when a mapped point's expected interval changed, since the ingest view and the
// site's data status are computed from it (gateway/index.ts gatewayChanged → registry, live status).

function notifyGateways(gatewayIds: readonly string[]) {
  for (const id of gatewayIds) getRuntime()?.gatewayChanged(id, "point_map");
}

function fieldError(issues: Array<{ path: string; message: string }>): AppError {
  return new AppError("bad_request", "The request is not valid.", issues);
}

export function addPoint(db: Db, viewer: Viewer, equipmentId: string, body: CreatePointBody) {
  const quantity = body.quantity;
  const limits = canonicalLimits(quantity, body);
  if ("issues" in limits) throw fieldError(limits.issues);
  return insertPoint(db, viewer, equipmentId, { quantity, expectedIntervalS: body.expectedIntervalS, ...limits });
}

export function editPoint(db: Db, viewer: Viewer, pointId: number, body: UpdatePointBody) {
  const current = getPoint(db, viewer, pointId);
  if (!current) throw notFound("No such point.");
  const limits = canonicalLimits(current.quantity as CreatePointBody["quantity"], body, current);
  if ("issues" in limits) throw fieldError(limits.issues);
  const { point, gatewayIds } = updatePoint(db, viewer, pointId, {
    expectedIntervalS: body.expectedIntervalS,
    ...limits,
  });
  if (body.expectedIntervalS !== undefined && body.expectedIntervalS !== current.expectedIntervalS)
    notifyGateways(gatewayIds);
  return point;
}

export function removePoint(db: Db, viewer: Viewer, pointId: number, opts: { discardHistory: boolean }) {
  deletePoint(db, viewer, pointId, opts);
}

/**
 * A site's point list from CSV text: parsed and checked row by row, then planned against the
 * site's equipment; applied (one transaction, audited) only when `apply` and every row is good.
 */
export function uploadPointList(
  db: Db,
  viewer: Viewer,
  siteId: string,
  csv: string,
  opts: { apply: boolean },
): PointListResultDto {
  if (csv.length > MAX_POINT_LIST_BYTES) throw new AppError("payload_too_large", "The point list is larger than 2 MB.");
  const { rows, errors } = parsePointListCsv(csv);
  // Planned even when rows failed, so unknown tags are reported together with the rest.
  const result = importPointList(db, viewer, siteId, rows, { apply: opts.apply && errors.length === 0 });
  const allErrors = [...errors, ...result.errors].sort((a, b) => a.line - b.line);
  if (result.applied) notifyGateways(result.gatewayIds);
  return { applied: result.applied, plan: result.plan, errors: allErrors };
}
