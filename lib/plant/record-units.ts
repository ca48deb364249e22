import type { UnitSystem } from "@/lib/units";
import { ATMOSPHERE_KPA, KPA_PER_PSI, KW_PER_TON, LPS_PER_GPM, cToF, fToC } from "./units";

// The units an equipment record's fields and a chiller's limits are typed in: the viewer's unit
// system on screen, canonical SI (as lib/schemas/equipment.ts stores it) through the API.

/** 1 ft of water (39.2 °F) = 2.98898 kPa (NIST SP 811, Appendix B.8). */
export const KPA_PER_FT_WATER = 2.98898;
/** 1 ft³/min = 4.719474 × 10⁻⁴ m³/s = 0.4719474 L/s (NIST SP 811, Appendix B.8). */
export const LPS_PER_CFM = 0.4719474;

/** What a record field measures, named with its canonical unit. */
export type RecordMeasure =
  | "tempC"
  | "flowLps"
  | "headKPa"
  | "airflowLps"
  | "capacityTons"
  | "capacityKW"
  | "percent"
  | "pressureKPaAbs"
  | "pressureDiffKPa"
  | "durationS"
  | "count";

interface Shown {
  label: string;
  /** Decimals a typed value is shown with; enough to give back what was stored. */
  digits: number;
  fromCanonical: (v: number) => number;
  toCanonical: (v: number) => number;
}

const same = (label: string, digits: number): Shown => ({
  label,
  digits,
  fromCanonical: (v) => v,
  toCanonical: (v) => v,
});
const scaled = (label: string, digits: number, canonicalPerShown: number): Shown => ({
  label,
  digits,
  fromCanonical: (v) => v / canonicalPerShown,
  toCanonical: (v) => v * canonicalPerShown,
});

const shown: Record<RecordMeasure, Record<UnitSystem, Shown>> = {
  tempC: {
    ip: { label: "°F", digits: 1, fromCanonical: cToF, toCanonical: fToC },
    si: same("°C", 1),
  },
  flowLps: { ip: scaled("gpm", 0, LPS_PER_GPM), si: same("L/s", 1) },
  headKPa: { ip: scaled("ft of water", 1, KPA_PER_FT_WATER), si: same("kPa", 0) },
  airflowLps: { ip: scaled("cfm", 0, LPS_PER_CFM), si: same("L/s", 0) },
  // Capacities: tons in IP, kW in SI, whichever the record stores.
  capacityTons: { ip: same("tons", 0), si: scaled("kW", 0, 1 / KW_PER_TON) },
  capacityKW: { ip: scaled("tons", 1, KW_PER_TON), si: same("kW", 0) },
  percent: { ip: same("%", 0), si: same("%", 0) },
  // Technicians read refrigerant pressures as gauge psig in IP; SI is absolute kPa (lib/units.ts does the same).
  pressureKPaAbs: {
    ip: {
      label: "psig",
      digits: 1,
      fromCanonical: (v) => (v - ATMOSPHERE_KPA) / KPA_PER_PSI,
      toCanonical: (v) => v * KPA_PER_PSI + ATMOSPHERE_KPA,
    },
    si: same("kPa (abs)", 0),
  },
  pressureDiffKPa: { ip: scaled("psi", 1, KPA_PER_PSI), si: same("kPa", 0) },
  durationS: { ip: same("s", 0), si: same("s", 0) },
  count: { ip: same("", 0), si: same("", 0) },
};

export function recordUnitLabel(measure: RecordMeasure, system: UnitSystem): string {
  return shown[measure][system].label;
}

/** A stored (canonical) value as the viewer types it, rounded to the digits the field shows. */
export function recordToDisplay(value: number, measure: RecordMeasure, system: UnitSystem): number {
  const s = shown[measure][system];
  const f = 10 ** s.digits;
  return Math.round(s.fromCanonical(value) * f) / f;
}

/**
 * A typed value in canonical units, rounded to 6 significant digits so that a shown value sent
 * back unchanged does not carry float noise (32 °F → 0 °C, not 1e-15).
 */
export function recordFromDisplay(value: number, measure: RecordMeasure, system: UnitSystem): number {
  const v = shown[measure][system].toCanonical(value);
  return v === 0 ? 0 : Number(v.toPrecision(6));
}

/** The measure of each chiller limit key (lib/plant/equipment-limits.ts). */
export const limitMeasures = {
  pressure: "pressureKPaAbs",
  pressure_difference: "pressureDiffKPa",
  temperature: "tempC",
  duration: "durationS",
  count: "count",
} as const satisfies Record<string, RecordMeasure>;
