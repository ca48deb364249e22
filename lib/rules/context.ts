// What every rule sees: the site, its history up to the evaluation time, settings, and the
// condition it raised last time (for dead bands). Helpers here derive per-chiller series.

import type { QuantityKey } from "@/lib/quantities";
import type { Equipment, Site } from "@/lib/plant/site";
import { towersServing } from "@/lib/plant/site";
import type { TimedValue } from "@/lib/plant/trend";
import { crossoverMarginK, refrigerantMarginK } from "@/lib/plant/crossover";
import type { SiteSnapshot } from "@/lib/plant/snapshot";
import type { HistoryView } from "./history";
import type { RuleId } from "./condition";
import type { RuleSettings } from "./settings";

/** Link status the server knows and readings cannot tell: whether the gateway is connected. */
export interface CommStatus {
  gatewayOnline?: boolean;
  /** Equipment the server has judged stale; when absent, staleness is judged from event time. */
  staleEquipment?: readonly string[];
}

export interface RuleContext {
  site: Site;
  history: HistoryView;
  settings: RuleSettings;
  nowMs: number;
  snapshot: SiteSnapshot;
  comms: CommStatus;
  /** The site's IANA time zone, for clock times written into messages (UTC when not given). */
  timeZone?: string;
  /** Whether this rule's raw condition was active for this equipment at the previous evaluation. */
  wasActive(ruleId: RuleId, tag: string): boolean;
}

export type Rule = (ctx: RuleContext) => import("./condition").Condition[];

export function num(ctx: RuleContext, tag: string, q: QuantityKey): number | null {
  const p = ctx.history.latestAt(tag, q, ctx.nowMs);
  return p && typeof p.value === "number" && Number.isFinite(p.value) ? p.value : null;
}

export function bool(ctx: RuleContext, tag: string, q: QuantityKey): boolean | null {
  const p = ctx.history.latestAt(tag, q, ctx.nowMs);
  return p && typeof p.value === "boolean" ? p.value : null;
}

export function str(ctx: RuleContext, tag: string, q: QuantityKey): string | null {
  const p = ctx.history.latestAt(tag, q, ctx.nowMs);
  return p && typeof p.value === "string" ? p.value : null;
}

export const chillersOf = (site: Site): Equipment[] => site.filter((e) => e.kind === "chiller");

/**
 * The plant wants this chiller: its enable command is on, or (without that point) it runs or
 * an air handler runs. A plant switched off for the night is not "heading for a crossover".
 */
export function chillerCalledFor(ctx: RuleContext, chiller: Equipment): boolean {
  const enable = bool(ctx, chiller.tag, "run_enable_command");
  if (enable !== null) return enable;
  if (bool(ctx, chiller.tag, "run_status") === true) return true;
  return ctx.site.some((e) => e.kind === "air_handler" && bool(ctx, e.tag, "run_status") === true);
}

/** Condenser water entering the chiller: its own sensor, else the leaving water of a tower serving it. */
export function condenserEnteringSource(ctx: RuleContext, chiller: Equipment): { tag: string; q: QuantityKey } | null {
  if (ctx.history.latestAt(chiller.tag, "condenser_water_entering_temp", ctx.nowMs))
    return { tag: chiller.tag, q: "condenser_water_entering_temp" };
  for (const t of towersServing(ctx.site, chiller.tag))
    if (ctx.history.latestAt(t.tag, "condenser_water_leaving_temp", ctx.nowMs))
      return { tag: t.tag, q: "condenser_water_leaving_temp" };
  return null;
}

/**
 * Crossover margin at every time either input was read within the window, pairing each with
 * the other's latest value at that moment.
 */
export function marginSeries(ctx: RuleContext, chiller: Equipment, windowS: number): TimedValue[] {
  const cw = condenserEnteringSource(ctx, chiller);
  if (!cw) return [];
  return pairedSeries(ctx, cw, { tag: chiller.tag, q: "chilled_water_entering_temp" }, windowS, crossoverMarginK);
}

/** The shells' saturated-temperature difference from their refrigerant pressures, over the window. */
export function refrigerantMarginSeries(
  ctx: RuleContext,
  chiller: Equipment,
  windowS: number,
  satTempC: (kPa: number) => number,
): TimedValue[] {
  return pairedSeries(
    ctx,
    { tag: chiller.tag, q: "condenser_refrigerant_pressure" },
    { tag: chiller.tag, q: "evaporator_refrigerant_pressure" },
    windowS,
    (c, e) => refrigerantMarginK(satTempC, c, e),
  );
}

/** `f(a, b)` at every time either series was read within the window, each paired with the other's latest value. */
function pairedSeries(
  ctx: RuleContext,
  aSrc: { tag: string; q: QuantityKey },
  bSrc: { tag: string; q: QuantityKey },
  windowS: number,
  f: (a: number, b: number) => number,
): TimedValue[] {
  const fromMs = ctx.nowMs - windowS * 1000;
  const as = ctx.history.numbers(aSrc.tag, aSrc.q, fromMs, ctx.nowMs);
  const bs = ctx.history.numbers(bSrc.tag, bSrc.q, fromMs, ctx.nowMs);
  // One walk over both series in time order, carrying each one's latest value (a reading
  // before the window counts until the window's first). Called for every chiller at every
  // evaluation over an hour of readings, so no per-time lookups.
  const before = (src: { tag: string; q: QuantityKey }) => {
    const v = ctx.history.latestAt(src.tag, src.q, fromMs - 1)?.value;
    return typeof v === "number" ? v : undefined;
  };
  let a = before(aSrc);
  let b = before(bSrc);
  const out: TimedValue[] = [];
  let i = 0;
  let j = 0;
  while (i < as.length || j < bs.length) {
    const t = Math.min(i < as.length ? as[i].tsMs : Infinity, j < bs.length ? bs[j].tsMs : Infinity);
    while (i < as.length && as[i].tsMs === t) a = as[i++].value;
    while (j < bs.length && bs[j].tsMs === t) b = bs[j++].value;
    if (a !== undefined && b !== undefined) out.push({ tsMs: t, value: f(a, b) });
  }
  return out;
}
