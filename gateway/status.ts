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
export function siteDataState(input: { gateways: number; online: number; mappedPoints: number; freshPoints: number }): SiteDataState {
  if (input.gateways === 0) return "no_gateway";
  if (input.online === 0) return "offline";
  return input.freshPoints >= input.mappedPoints ? "live" : "stale";
}
