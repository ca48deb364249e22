import type { EquipmentKind, QuantityKey } from "@/lib/quantities";
import type { ChillerLimitValues, CompressorType } from "./equipment-limits";

/** One piece of plant equipment as a site describes it. */
export interface Equipment {
  tag: string;
  kind: EquipmentKind;
  /** Nominal capacity, refrigeration tons (chillers). */
  capacityTons?: number;
  /** Design chilled-water (evaporator) flow, L/s (chillers); used while the pumps serving it are proven. */
  designFlowLps?: number;
  /** Chillers: design condenser-water flow, L/s. */
  cwDesignFlowLps?: number;
  /** Chillers: water pressure drop across each barrel at design flow, kPa (the AHRI rating sheet's figures). */
  evapDesignDpKPa?: number;
  condDesignDpKPa?: number;
  /** Pumps: the loop they move. */
  loop?: "chilled_water" | "condenser_water";
  refrigerant?: string;
  /** Tag of the equipment this one serves (a pump or tower serving a chiller). */
  serves?: string;
  /** Chillers: the kind of compressor (sets some limits' defaults). */
  compressorType?: CompressorType;
  /**
   * Chillers: the controller's limits and settings from the equipment record (entered values over
   * the refrigerant's and compressor's defaults). Absent: the defaults for its refrigerant.
   */
  limits?: ChillerLimitValues;
}

export type Site = readonly Equipment[];

export type ReadingValue = number | boolean | string;

/** One canonical reading: SI units as `lib/quantities.ts` defines them, stamped with event time. */
export interface Reading {
  tsMs: number;
  equipment: string;
  quantity: QuantityKey;
  value: ReadingValue;
}

export interface LatestPoint {
  value: ReadingValue;
  tsMs: number;
}

/** Latest value of each point, by equipment tag then quantity. */
export type LatestValues = Readonly<Record<string, Partial<Record<QuantityKey, LatestPoint>>>>;

/** Keeps the newest reading (by event time) of every point. */
export function latestFromReadings(readings: Iterable<Reading>, into: LatestValues = {}): LatestValues {
  const out: Record<string, Partial<Record<QuantityKey, LatestPoint>>> = {};
  for (const [tag, points] of Object.entries(into)) out[tag] = { ...points };
  for (const r of readings) {
    const points = (out[r.equipment] ??= {});
    const prev = points[r.quantity];
    if (!prev || prev.tsMs <= r.tsMs) points[r.quantity] = { value: r.value, tsMs: r.tsMs };
  }
  return out;
}

export function numberAt(latest: LatestValues, tag: string, q: QuantityKey): number | null {
  const v = latest[tag]?.[q]?.value;
  return typeof v === "number" && Number.isFinite(v) ? v : null;
}

export function booleanAt(latest: LatestValues, tag: string, q: QuantityKey): boolean | null {
  const v = latest[tag]?.[q]?.value;
  return typeof v === "boolean" ? v : null;
}

export function equipmentOfKind(site: Site, kind: EquipmentKind): Equipment[] {
  return site.filter((e) => e.kind === kind);
}

/** Equipment whose `serves` names the given tag (pumps and towers serving a chiller). */
export function servingEquipment(site: Site, tag: string, kind?: EquipmentKind): Equipment[] {
  return site.filter((e) => e.serves === tag && (kind === undefined || e.kind === kind));
}

/**
 * Towers that supply this chiller's condenser water: those whose `serves` names it, or —
 * when no tower of the site names anything — every tower (a common header).
 */
export function towersServing(site: Site, chillerTag: string): Equipment[] {
  const towers = equipmentOfKind(site, "cooling_tower");
  const named = towers.filter((t) => t.serves === chillerTag);
  if (named.length) return named;
  return towers.every((t) => t.serves === undefined) ? towers : [];
}
