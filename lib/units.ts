import convert from "convert-units";
import { ATMOSPHERE_KPA, deltaKToDeltaF } from "./plant/units";
import { canonicalUnits, quantities, type Measure, type QuantityKey } from "./quantities";

// Unit handling at the two edges of the product: gateways send whatever their controllers
// use (converted to canonical SI on ingest), and screens show IP or SI per user preference.
// Factors come from convert-units; tests check them against NIST SP 811.

/** Standard atmosphere, 101.325 kPa (NIST SP 811 B.8), for gauge ↔ absolute. */
export const STANDARD_ATMOSPHERE_KPA = ATMOSPHERE_KPA;

interface WireUnit {
  measure: Measure;
  /** convert-units abbreviation, when a factor is involved. */
  lib?: convert.Unit;
  /** Gauge pressure: add one atmosphere after converting. */
  gauge?: boolean;
}

/** Unit codes a point map may declare. */
export const wireUnits = {
  degC: { measure: "temperature", lib: "C" },
  degF: { measure: "temperature", lib: "F" },
  K: { measure: "temperature", lib: "K" },
  kPa: { measure: "pressure", lib: "kPa" },
  kPag: { measure: "pressure", lib: "kPa", gauge: true },
  psia: { measure: "pressure", lib: "psi" },
  psig: { measure: "pressure", lib: "psi", gauge: true },
  bar: { measure: "pressure", lib: "bar" },
  barg: { measure: "pressure", lib: "bar", gauge: true },
  kPad: { measure: "differential_pressure", lib: "kPa" },
  psid: { measure: "differential_pressure", lib: "psi" },
  "L/s": { measure: "flow", lib: "l/s" },
  gpm: { measure: "flow", lib: "gal/min" },
  "m3/h": { measure: "flow", lib: "m3/h" },
  kW: { measure: "power", lib: "kW" },
  W: { measure: "power", lib: "W" },
  "%": { measure: "percent" },
  Hz: { measure: "frequency", lib: "Hz" },
  s: { measure: "duration", lib: "s" },
  min: { measure: "duration", lib: "min" },
  bool: { measure: "boolean" },
  state: { measure: "state" },
  text: { measure: "text" },
} as const satisfies Record<string, WireUnit>;

export type WireUnitCode = keyof typeof wireUnits;
export const wireUnitCodes = Object.keys(wireUnits) as WireUnitCode[];

/** The wire unit an IP controller reports each measure in: pressures gauge (psig), water ΔP in psid. */
export const ipWireUnits: Record<Measure, WireUnitCode> = {
  temperature: "degF",
  pressure: "psig",
  differential_pressure: "psid",
  flow: "gpm",
  power: "kW",
  percent: "%",
  frequency: "Hz",
  duration: "s",
  boolean: "bool",
  state: "state",
  text: "text",
};

export function isWireUnit(code: string): code is WireUnitCode {
  return Object.prototype.hasOwnProperty.call(wireUnits, code);
}

/** Whether a gateway unit can feed a quantity (degF can feed a temperature, not a pressure). */
export function unitFits(code: WireUnitCode, quantity: QuantityKey): boolean {
  const measure = quantities[quantity].measure;
  const unit: WireUnit = wireUnits[code];
  return unit.measure === measure;
}

const canonicalLib: Partial<Record<Measure, convert.Unit>> = {
  temperature: "C",
  pressure: "kPa",
  differential_pressure: "kPa",
  flow: "l/s",
  power: "kW",
  frequency: "Hz",
  duration: "s",
};

/**
 * An affine conversion's factor and offset, to 15 significant digits: f(1) − f(0) carries
 * float noise in the last digits (1.7999999999999972 for °C → °F) that would otherwise show up
 * in every converted value. Published factors have fewer digits than that (NIST SP 811 App. B).
 */
function affine(f: (v: number) => number): { scale: number; offset: number } {
  const round = (x: number) => Number(x.toPrecision(15));
  return { scale: round(f(1) - f(0)), offset: round(f(0)) };
}

/**
 * Each wire unit's conversion to canonical as `value × scale + offset`, taken from convert-units
 * once (every unit here is affine: a factor, plus an offset for °F and gauge pressures), so a
 * reading costs a multiply and an add, not a convert-units call.
 */
const toCanonicalAffine = Object.fromEntries(
  wireUnitCodes.map((code) => {
    const unit: WireUnit = wireUnits[code];
    const target = canonicalLib[unit.measure];
    const f = (v: number) => (!unit.lib || !target || unit.lib === target ? v : convert(v).from(unit.lib).to(target));
    const { scale, offset } = affine(f);
    return [code, { scale, offset: offset + (unit.gauge ? STANDARD_ATMOSPHERE_KPA : 0) }];
  }),
) as Record<WireUnitCode, { scale: number; offset: number }>;

/** A numeric reading in a wire unit, in its measure's canonical unit. */
export function toCanonical(value: number, code: WireUnitCode): number {
  const a = toCanonicalAffine[code];
  return value * a.scale + a.offset;
}

export type UnitSystem = "ip" | "si";

interface DisplayUnit {
  label: string;
  lib?: convert.Unit;
  gauge?: boolean;
  digits: number;
}

// Technicians read refrigerant pressures as gauge psig in IP; SI shows absolute kPa, marked "kPa abs" so neither is mistaken for the other.
const displayUnits: Record<UnitSystem, Record<Measure, DisplayUnit>> = {
  ip: {
    temperature: { label: "°F", lib: "F", digits: 1 },
    pressure: { label: "psig", lib: "psi", gauge: true, digits: 1 },
    differential_pressure: { label: "psi", lib: "psi", digits: 2 },
    flow: { label: "gpm", lib: "gal/min", digits: 0 },
    power: { label: "kW", digits: 0 },
    percent: { label: "%", digits: 0 },
    frequency: { label: "Hz", digits: 1 },
    duration: { label: "s", digits: 0 },
    boolean: { label: "", digits: 0 },
    state: { label: "", digits: 0 },
    text: { label: "", digits: 0 },
  },
  si: {
    temperature: { label: "°C", digits: 1 },
    pressure: { label: "kPa abs", digits: 0 },
    differential_pressure: { label: "kPa", digits: 1 },
    flow: { label: "L/s", digits: 1 },
    power: { label: "kW", digits: 0 },
    percent: { label: "%", digits: 0 },
    frequency: { label: "Hz", digits: 1 },
    duration: { label: "s", digits: 0 },
    boolean: { label: "", digits: 0 },
    state: { label: "", digits: 0 },
    text: { label: "", digits: 0 },
  },
};

export function displayUnit(measure: Measure, system: UnitSystem): string {
  return displayUnits[system][measure].label;
}

/** A canonical value in the viewer's unit system (numbers only). */
/** Canonical to display as `value × scale + offset`, from convert-units once per system and measure (a trend converts thousands of values). */
const fromCanonicalAffine = Object.fromEntries(
  (["ip", "si"] as const).map((system) => [
    system,
    Object.fromEntries(
      (Object.keys(displayUnits[system]) as Measure[]).map((measure) => {
        const unit = displayUnits[system][measure];
        const source = canonicalLib[measure];
        const f = (value: number) => {
          if (!unit.lib || !source) return value;
          const absolute = unit.gauge ? value - STANDARD_ATMOSPHERE_KPA : value;
          return unit.lib === source ? absolute : convert(absolute).from(source).to(unit.lib);
        };
        return [measure, affine(f)];
      }),
    ),
  ]),
) as Record<UnitSystem, Record<Measure, { scale: number; offset: number }>>;

export function fromCanonical(value: number, measure: Measure, system: UnitSystem): number {
  const a = fromCanonicalAffine[system][measure];
  return value * a.scale + a.offset;
}

/** A temperature difference (ΔT, approach, margin) in the viewer's units: scale only, no offset. */
export function deltaFromCanonical(deltaC: number, system: UnitSystem): number {
  return system === "ip" ? deltaKToDeltaF(deltaC) : deltaC;
}

export function formatValue(
  value: number | boolean | string | null | undefined,
  measure: Measure,
  system: UnitSystem,
): string {
  if (value === null || value === undefined) return "—";
  if (typeof value === "boolean") return value ? "On" : "Off";
  if (typeof value === "string") return value;
  const unit = displayUnits[system][measure];
  const shown = fromCanonical(value, measure, system).toFixed(unit.digits);
  return unit.label ? `${shown} ${unit.label}` : shown;
}

/** A duration as screens and alarm messages give it: "45 s", "12 min", "2 h 5 min"; "—" when unknown. */
export function formatDuration(seconds: number | null | undefined): string {
  if (seconds === null || seconds === undefined || !Number.isFinite(seconds)) return "—";
  const s = Math.max(0, Math.round(seconds));
  if (s < 90) return `${s} s`;
  const m = Math.round(s / 60);
  if (m < 90) return `${m} min`;
  const h = Math.floor(m / 60);
  return m % 60 ? `${h} h ${m % 60} min` : `${h} h`;
}

export { canonicalUnits };
