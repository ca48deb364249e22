// A chiller's controller limits and settings that the rules need, with the default each takes
// until someone enters the nameplate or controller value. Canonical units (°C, kPa absolute,
// kPa differences, s). Defaults follow the refrigerant and the kind of compressor; every one is
// marked as a default on screen, because the real value is the one set in that chiller's controller.

import { refrigerants, saturationPressureKPa, saturationTempC, type Refrigerant } from "@/lib/refrigerant";
import { psigToKpaAbs } from "./units";

export const compressorTypes = [
  "centrifugal_vsd_oil_free",
  "centrifugal_vsd",
  "centrifugal_fixed_speed",
  "screw",
  "scroll",
] as const;
export type CompressorType = (typeof compressorTypes)[number];

export const compressorTypeLabels: Record<CompressorType, string> = {
  centrifugal_vsd_oil_free: "Centrifugal, variable speed, oil-free",
  centrifugal_vsd: "Centrifugal, variable speed",
  centrifugal_fixed_speed: "Centrifugal, fixed speed",
  screw: "Screw",
  scroll: "Scroll",
};

export const chillerLimitKeys = [
  "highCondPressureCutoutKPa",
  "lowEvapTempCutoutC",
  "driveTempTripC",
  "minStartLiftKPa",
  "startToStartS",
  "stopToStartS",
  "minStartToStartS",
  "minStopToStartS",
  "maxStartsPerHour",
] as const;
export type ChillerLimitKey = (typeof chillerLimitKeys)[number];
export type ChillerLimitValues = Record<ChillerLimitKey, number>;

export const chillerLimitLabels: Record<ChillerLimitKey, { label: string; measure: LimitMeasure }> = {
  highCondPressureCutoutKPa: { label: "High condenser pressure cut-out", measure: "pressure" },
  lowEvapTempCutoutC: { label: "Low evaporator temperature cut-out", measure: "temperature" },
  driveTempTripC: { label: "Drive (inverter) temperature trip", measure: "temperature" },
  minStartLiftKPa: {
    label: "Minimum condenser − evaporator pressure difference at start",
    measure: "pressure_difference",
  },
  startToStartS: { label: "Anti-recycle start-to-start time", measure: "duration" },
  stopToStartS: { label: "Anti-recycle stop-to-start time", measure: "duration" },
  minStartToStartS: { label: "Start-to-start time, lowest allowed", measure: "duration" },
  minStopToStartS: { label: "Stop-to-start time, lowest allowed", measure: "duration" },
  maxStartsPerHour: { label: "Starts per hour, most allowed", measure: "count" },
};
export type LimitMeasure = "pressure" | "pressure_difference" | "temperature" | "duration" | "count";

/**
 * Condensing temperature of the default high-pressure cut-out: the temperature R-134a has at
 * 160 psig (≈ 46.6 °C, 116 °F), a usual setting on R-134a centrifugals (recalled, not verified).
 * Other refrigerants get their own saturation pressure at that temperature, so the cut-out
 * protects the same condensing condition.
 */
export const defaultCutoutCondensingC = saturationTempC("R-134a", psigToKpaAbs(160));

const DEFAULT_REFRIGERANT: Refrigerant = "R-134a";

export function asRefrigerant(name: string | null | undefined): Refrigerant | null {
  return refrigerants.find((r) => r === name) ?? null;
}

/** The default of every limit, and why, for this refrigerant and compressor. */
export function chillerLimitDefaults(
  refrigerant: string | null | undefined,
  compressorType: CompressorType | null | undefined,
): Record<ChillerLimitKey, { value: number; basis: string }> {
  const r = asRefrigerant(refrigerant) ?? DEFAULT_REFRIGERANT;
  const oilFree = compressorType === "centrifugal_vsd_oil_free" || compressorType == null;
  return {
    highCondPressureCutoutKPa: {
      value: round1(saturationPressureKPa(r, defaultCutoutCondensingC)),
      basis: `${r} saturation pressure at ${defaultCutoutCondensingC.toFixed(1)} °C, the condensing temperature of a 160 psig cut-out on R-134a (recalled)`,
    },
    lowEvapTempCutoutC: {
      value: round1((33 - 32) / 1.8),
      basis: "33 °F saturated evaporating temperature, freeze protection for water (common practice)",
    },
    driveTempTripC: {
      value: round1((150 - 32) / 1.8),
      basis: "150 °F drive over-temperature trip (common practice, recalled)",
    },
    minStartLiftKPa: {
      // A refrigerant-cooled motor and drive need liquid pushed from the condenser to them.
      value: oilFree ? 70 : 35,
      basis: oilFree
        ? "≈ 10 psid for refrigerant-cooled motor and drive at start (recalled, not verified)"
        : "≈ 5 psid for oil and motor cooling at start (recalled, not verified)",
    },
    startToStartS: { value: 900, basis: "15 min start-to-start (common practice)" },
    stopToStartS: { value: 180, basis: "3 min stop-to-start (common practice)" },
    minStartToStartS: {
      value: 120,
      basis: "2 min, lowest start-to-start a controller usually allows (common practice)",
    },
    minStopToStartS: { value: 60, basis: "1 min, lowest stop-to-start a controller usually allows (common practice)" },
    maxStartsPerHour: { value: 4, basis: "4 starts an hour (common practice for large motors)" },
  };
}

export interface EnteredLimit {
  key: ChillerLimitKey;
  value: number;
  setBy: string | null;
  setByName?: string | null;
  setAtMs: number;
}

export interface EffectiveLimit {
  key: ChillerLimitKey;
  value: number;
  /** `default` until someone enters the nameplate or controller value. */
  source: "default" | "entered";
  basis: string;
  setBy?: string | null;
  setByName?: string | null;
  setAtMs?: number;
}

/** Entered values over the defaults, one entry per key. */
export function effectiveChillerLimits(
  refrigerant: string | null | undefined,
  compressorType: CompressorType | null | undefined,
  entered: readonly EnteredLimit[],
): Record<ChillerLimitKey, EffectiveLimit> {
  const defaults = chillerLimitDefaults(refrigerant, compressorType);
  const out = {} as Record<ChillerLimitKey, EffectiveLimit>;
  for (const key of chillerLimitKeys) out[key] = { key, source: "default", ...defaults[key] };
  for (const e of entered) {
    if (!(e.key in out)) continue;
    out[e.key] = {
      key: e.key,
      value: e.value,
      source: "entered",
      basis: "entered from the nameplate or controller",
      setBy: e.setBy,
      setByName: e.setByName ?? null,
      setAtMs: e.setAtMs,
    };
  }
  return out;
}

export function limitValues(limits: Record<ChillerLimitKey, EffectiveLimit>): ChillerLimitValues {
  const out = {} as ChillerLimitValues;
  for (const key of chillerLimitKeys) out[key] = limits[key].value;
  return out;
}

/** Cross-field checks a single value cannot express; returns one message per problem, keyed by field. */
export function chillerLimitProblems(v: ChillerLimitValues): { key: ChillerLimitKey; message: string }[] {
  const problems: { key: ChillerLimitKey; message: string }[] = [];
  if (v.minStartToStartS > v.startToStartS)
    problems.push({ key: "startToStartS", message: "Start-to-start time is below its lowest allowed value." });
  if (v.minStopToStartS > v.stopToStartS)
    problems.push({ key: "stopToStartS", message: "Stop-to-start time is below its lowest allowed value." });
  return problems;
}

const round1 = (x: number) => Math.round(x * 10) / 10;

const defaultValuesCache = new Map<string, ChillerLimitValues>();

/**
 * The limits the rules use for a chiller: its record's (entered over defaults), or — for a
 * chiller described without them (tests, the simulator's own model) — its refrigerant's defaults.
 */
export function limitsOf(chiller: {
  refrigerant?: string | null;
  compressorType?: CompressorType | null;
  limits?: ChillerLimitValues;
}): ChillerLimitValues {
  if (chiller.limits) return chiller.limits;
  const cacheKey = `${chiller.refrigerant ?? ""}|${chiller.compressorType ?? ""}`;
  let values = defaultValuesCache.get(cacheKey);
  if (!values) {
    values = limitValues(effectiveChillerLimits(chiller.refrigerant, chiller.compressorType, []));
    defaultValuesCache.set(cacheKey, values);
  }
  return values;
}
