import type { Db } from "@/db/client";
import { findSparkplugGatewayId, loadIngestGateway, type IngestGateway } from "@/db/queries/gateways";

// Gateways and their point maps, cached for the hot path and dropped when an API call
// changes them (gateway/link.ts). An expiry of minutes covers changes made by another process;
// one of seconds reloaded a portfolio's 100,000 mapped points every few seconds.

export interface GatewayRegistry {
  get(gatewayId: string): IngestGateway | null;
  bySparkplug(groupId: string, edgeNodeId: string): IngestGateway | null;
  invalidate(gatewayId?: string): void;
}

export function createGatewayRegistry(deps: { db: Db; clock?: { now(): number }; ttlMs?: number }): GatewayRegistry {
  const ttl = deps.ttlMs ?? 300_000;
  const now = () => deps.clock?.now() ?? Date.now();
  const cache = new Map<string, { expires: number; gw: IngestGateway | null }>();
  const sparkplugIds = new Map<string, string | null>();

  function get(gatewayId: string): IngestGateway | null {
    const hit = cache.get(gatewayId);
    if (hit && now() < hit.expires) return hit.gw;
    const gw = loadIngestGateway(deps.db, gatewayId);
    // Expiry spread over [ttl/2, ttl]: gateways that connected together would otherwise all
    // reload their point maps in the same turn of the event loop (~2.5 ms per 500 points).
    cache.set(gatewayId, { expires: now() + ttl * (0.5 + Math.random() / 2), gw });
    return gw;
  }

  return {
    get,
    bySparkplug(groupId, edgeNodeId) {
      const key = `${groupId}/${edgeNodeId}`;
      let id = sparkplugIds.get(key);
      if (id === undefined) {
        id = findSparkplugGatewayId(deps.db, groupId, edgeNodeId);
        sparkplugIds.set(key, id);
      }
      return id ? get(id) : null;
    },
    invalidate(gatewayId) {
      if (gatewayId) cache.delete(gatewayId);
      else cache.clear();
      sparkplugIds.clear();
    },
  };
}
