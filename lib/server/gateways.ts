import type { Db } from "@/db/client";
import { createGateway, replacePointMap, revokeGateway, rotateGatewayPassword } from "@/db/queries/gateways";
import type { Viewer } from "@/lib/auth/viewer";
import { AppError } from "@/lib/errors";
import { MAX_POINT_MAP_BYTES, parsePointMapCsv } from "@/lib/point-map-csv";
import { getRuntime } from "./runtime";

// Gateway administration as whole acts: each writes the record and tells the running gateway
// side in one call, so no route can do the first half and forget the second.

export async function provisionGateway(db: Db, viewer: Viewer, input: Parameters<typeof createGateway>[2]) {
  const created = await createGateway(db, viewer, input);
  getRuntime()?.gatewayChanged(created.gateway.id, "provisioned");
  return created;
}

/** A new password (shown once); the old one stops working and live connections are closed. */
export async function rotateGatewayCredentials(db: Db, viewer: Viewer, gatewayId: string) {
  const rotated = await rotateGatewayPassword(db, viewer, gatewayId);
  getRuntime()?.gatewayChanged(gatewayId, "credentials");
  return rotated;
}

/** Revokes the credentials for good and drops the gateway's live connection. */
export function retireGateway(db: Db, viewer: Viewer, gatewayId: string) {
  const gateway = revokeGateway(db, viewer, gatewayId);
  getRuntime()?.gatewayChanged(gatewayId, "revoked");
  return gateway;
}

/**
 * Replaces a gateway's point map with a CSV text (`gateway_point,equipment,quantity,unit`): all
 * rows or none. A text over the size limit is refused before it is parsed.
 */
export function replaceGatewayPointMap(db: Db, viewer: Viewer, gatewayId: string, csv: string) {
  if (csv.length > MAX_POINT_MAP_BYTES) throw new AppError("payload_too_large", "The point map is larger than 2 MB.");
  const { rows, errors } = parsePointMapCsv(csv);
  const result = replacePointMap(db, viewer, gatewayId, rows, errors);
  if (result.errors.length === 0) getRuntime()?.gatewayChanged(gatewayId, "point_map");
  return result;
}
