import { cToF, deltaKToDeltaF, kpaAbsToPsig, KPA_PER_PSI } from "./plant/units";
import type { UnitSystem } from "./units";

// Numbers inside stored words (alarm messages, advice): a rule writes each quantity as a token
// carrying its kind and canonical SI value, and every reader — a page, an e-mail, a push, a text —
// renders it in that reader's unit system. Text without tokens (rows stored before this) reads as it was.

/** Quantity kinds a message may carry, each with its canonical unit. */
export const quantityKinds = {
  /** A temperature, °C. */
  t: "temperature",
  /** A temperature difference (margin, approach), K. */
  dt: "temperature difference",
  /** A rate of temperature change, K/min. */
  rt: "temperature rate",
  /** A refrigerant pressure, kPa absolute. */
  p: "pressure",
  /** A pressure difference (lift, margin to a cut-out), kPa. */
  dp: "pressure difference",
  /** A rate of pressure change, kPa/min. */
  pr: "pressure rate",
} as const;
export type QuantityKind = keyof typeof quantityKinds;

const OPEN = "\u27e6";
const CLOSE = "\u27e7";
const TOKEN = /\u27e6(t|dt|rt|p|dp|pr):(-?[0-9.eE+-]+)\u27e7/g;

/** A quantity as a token in a message: kind and canonical value, rendered later per reader. */
export function quantityToken(kind: QuantityKind, value: number): string {
  return `${OPEN}${kind}:${Number(value.toPrecision(6))}${CLOSE}`;
}

/**
 * One quantity in a unit system. Factors: °F = 1.8·°C + 32, ΔT 1 K = 1.8 °F, 1 psi = 6.894757 kPa and
 * standard atmosphere 101.325 kPa for gauge (NIST SP 811, 2008, App. B.8 and B.9). Pressures say whether
 * they are gauge or absolute; differences and rates need neither.
 */
export function formatQuantity(kind: QuantityKind, value: number, system: UnitSystem): string {
  const ip = system === "ip";
  switch (kind) {
    case "t":
      return ip ? `${cToF(value).toFixed(1)} °F` : `${value.toFixed(1)} °C`;
    case "dt":
      return ip ? `${deltaKToDeltaF(value).toFixed(1)} °F` : `${value.toFixed(1)} K`;
    case "rt":
      return ip ? `${deltaKToDeltaF(value).toFixed(2)} °F/min` : `${value.toFixed(2)} K/min`;
    case "p":
      return ip ? `${kpaAbsToPsig(value).toFixed(1)} psig` : `${value.toFixed(0)} kPa abs`;
    case "dp":
      return ip ? `${(value / KPA_PER_PSI).toFixed(1)} psi` : `${value.toFixed(0)} kPa`;
    case "pr":
      return ip ? `${(value / KPA_PER_PSI).toFixed(2)} psi/min` : `${value.toFixed(1)} kPa/min`;
  }
}

/** Stored words in the reader's units: every token rendered, other text untouched. */
export function renderQuantities(text: string, system: UnitSystem): string {
  if (!text.includes(OPEN)) return text;
  return text.replace(TOKEN, (whole, kind: QuantityKind, raw: string) => {
    const value = Number(raw);
    return Number.isFinite(value) ? formatQuantity(kind, value, system) : whole;
  });
}

/** The quantities a message carries, in order (for tests and machine readers). */
export function quantitiesIn(text: string): Array<{ kind: QuantityKind; value: number }> {
  return [...text.matchAll(TOKEN)].map((m) => ({ kind: m[1] as QuantityKind, value: Number(m[2]) }));
}

/** An alarm's stored words (messages, advice, caution) rendered for one reader. */
export function renderDetailWords<
  D extends { technicianMessage: string; ownerMessage: string; advice: string[]; caution: string | null },
>(detail: D, system: UnitSystem): D {
  return {
    ...detail,
    technicianMessage: renderQuantities(detail.technicianMessage, system),
    ownerMessage: renderQuantities(detail.ownerMessage, system),
    advice: detail.advice.map((a) => renderQuantities(a, system)),
    caution: detail.caution === null ? null : renderQuantities(detail.caution, system),
  };
}
