// Freshness rules shared by the live publisher, the latest-values API and the status DTO,
// so every screen answers "is this live?" the same way. Ages use event time (reading ts).

export const STALE_FACTOR = 3;
/** A gateway is silent when nothing arrived for 3× its slowest point's interval, never less than this. */
export const MIN_SILENCE_MS = 30_000;

export function isStale(tsMs: number, expectedIntervalS: number, nowMs: number): boolean {
  return nowMs - tsMs > STALE_FACTOR * expectedIntervalS * 1000;
}

export function silenceMs(maxExpectedIntervalS: number | null | undefined): number {
  return Math.max(MIN_SILENCE_MS, STALE_FACTOR * (maxExpectedIntervalS ?? 0) * 1000);
}

export interface PresenceInput {
  state: "unknown" | "online" | "offline";
  stateChangedAtMs: number | null;
  lastMessageAtMs: number | null;
  revoked: boolean;
  silenceMs: number;
}

/** Online: not revoked, no offline signal (last will, NDEATH, disconnect) and not silent. */
export function isOnline(p: PresenceInput, nowMs: number): boolean {
  if (p.revoked || p.state === "offline") return false;
  const lastSign = Math.max(p.lastMessageAtMs ?? 0, p.state === "online" ? (p.stateChangedAtMs ?? 0) : 0);
  return lastSign > 0 && nowMs - lastSign <= p.silenceMs;
}

export type SiteDataState = "live" | "stale" | "no_gateway" | "offline";

/**
 * live: a gateway is online and every mapped point is fresh; stale: online but some mapped
 * point is old or missing; offline: gateways exist, none online; no_gateway: none provisioned.
 */
export function siteDataState(input: {
  gateways: number;
  online: number;
  mappedPoints: number;
  freshPoints: number;
}): SiteDataState {
  if (input.gateways === 0) return "no_gateway";
  if (input.online === 0) return "offline";
  return input.freshPoints >= input.mappedPoints ? "live" : "stale";
}

export interface SiteStatusRow {
  data: SiteDataState;
  gateways: Map<string, { online: boolean; lastMessageAtMs: number | null }>;
}

export interface MappedPoint {
  gatewayId: string;
  pointId: number;
  expectedIntervalS: number;
}

export interface GatewayPresence extends Omit<PresenceInput, "silenceMs"> {
  gatewayId: string;
  siteId: string;
}

export interface GatewayFreshness {
  mapped: number;
  fresh: number;
  /** The longest expected interval among its points, seconds. */
  slowest: number;
}

/**
 * Mapped and fresh point counts per gateway, from each point's newest event time. Runs over a
 * portfolio's mapped points every status round: rows grouped by gateway (as `mappedPoints`
 * returns them) cost one map lookup per gateway, not per point.
 */
export function freshnessByGateway(
  mapped: readonly MappedPoint[],
  latestTs: (pointId: number) => number | null | undefined,
  nowMs: number,
  /** A part of `mapped` only, added to `into` (the live publisher spreads a round over several turns). */
  part: { from: number; to: number; into: Map<string, GatewayFreshness> } = {
    from: 0,
    to: mapped.length,
    into: new Map(),
  },
): Map<string, GatewayFreshness> {
  const byGateway = part.into;
  let lastGateway: string | undefined;
  let f: GatewayFreshness | undefined;
  for (let i = part.from; i < part.to; i++) {
    const m = mapped[i];
    if (m.gatewayId !== lastGateway || !f) {
      lastGateway = m.gatewayId;
      f = byGateway.get(m.gatewayId);
      if (!f) byGateway.set(m.gatewayId, (f = { mapped: 0, fresh: 0, slowest: 0 }));
    }
    f.mapped++;
    const ts = latestTs(m.pointId);
    if (ts !== null && ts !== undefined && !isStale(ts, m.expectedIntervalS, nowMs)) f.fresh++;
    if (m.expectedIntervalS > f.slowest) f.slowest = m.expectedIntervalS;
  }
  return byGateway;
}

/** Every listed site's data status from its gateways' presence and the freshness of their points. */
export function siteStatuses(input: {
  siteIds: Iterable<string>;
  presence: readonly GatewayPresence[];
  freshness: ReadonlyMap<string, GatewayFreshness>;
  nowMs: number;
}): Map<string, SiteStatusRow> {
  const acc = new Map<
    string,
    { gateways: number; online: number; mapped: number; fresh: number; rows: SiteStatusRow["gateways"] }
  >();
  for (const id of input.siteIds) acc.set(id, { gateways: 0, online: 0, mapped: 0, fresh: 0, rows: new Map() });
  for (const g of input.presence) {
    const a = acc.get(g.siteId);
    if (!a || g.revoked) continue;
    const f = input.freshness.get(g.gatewayId);
    const online = isOnline({ ...g, silenceMs: silenceMs(f?.slowest) }, input.nowMs);
    a.gateways++;
    if (online) a.online++;
    a.mapped += f?.mapped ?? 0;
    a.fresh += f?.fresh ?? 0;
    a.rows.set(g.gatewayId, { online, lastMessageAtMs: g.lastMessageAtMs });
  }
  const out = new Map<string, SiteStatusRow>();
  for (const [id, a] of acc)
    out.set(id, {
      data: siteDataState({ gateways: a.gateways, online: a.online, mappedPoints: a.mapped, freshPoints: a.fresh }),
      gateways: a.rows,
    });
  return out;
}
