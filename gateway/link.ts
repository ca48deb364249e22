// Route handlers run inside Next's bundle, apart from the server.ts module graph, so they
// reach the running gateway side through globalThis: a point-map change drops the cached map,
// a revoke or rotation cuts the gateway's live connection.

export type GatewayChange = "provisioned" | "point_map" | "credentials" | "revoked";

export interface GatewayLink {
  changed(gatewayId: string, change: GatewayChange): void;
}

const g = globalThis as unknown as { __liftlineGatewayLink?: GatewayLink };

export function setGatewayLink(link: GatewayLink | undefined): void {
  g.__liftlineGatewayLink = link;
}

/** Safe to call when no gateway side runs (tests of routes alone): then it does nothing. */
export function notifyGatewayChanged(gatewayId: string, change: GatewayChange): void {
  g.__liftlineGatewayLink?.changed(gatewayId, change);
}
