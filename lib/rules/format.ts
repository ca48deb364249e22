// Numbers as technicians read them: °F beside °C, psig beside kPa.

import { cToF, deltaKToDeltaF, kpaAbsToPsig } from "@/lib/plant/units";

/** 1 psi = 6.894757 kPa (NIST SP 811 B.8). */
const KPA_PER_PSI = 6.894757;

export const fmtTemp = (c: number): string => `${c.toFixed(1)} °C (${cToF(c).toFixed(0)} °F)`;
export const fmtDelta = (k: number): string => `${k.toFixed(1)} K (${deltaKToDeltaF(k).toFixed(1)} °F)`;
/** A rate of temperature change, K/min with °F/min beside it. */
export const fmtRate = (kPerMin: number): string =>
  `${kPerMin.toFixed(2)} K/min (${deltaKToDeltaF(kPerMin).toFixed(2)} °F/min)`;
/** A pressure, or with `difference` a pressure difference (kPa, psi; no gauge offset). */
export const fmtPressure = (kpa: number, difference = false): string =>
  difference
    ? `${kpa.toFixed(0)} kPa (${(kpa / KPA_PER_PSI).toFixed(1)} psi)`
    : `${kpa.toFixed(0)} kPa (${kpaAbsToPsig(kpa).toFixed(0)} psig)`;
