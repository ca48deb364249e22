// Numbers as technicians read them: °F beside °C, psig beside kPa.

import { cToF, deltaKToDeltaF, kpaAbsToPsig } from "@/lib/plant/units";

export const fmtTemp = (c: number): string => `${c.toFixed(1)} °C (${cToF(c).toFixed(0)} °F)`;
export const fmtDelta = (k: number): string => `${k.toFixed(1)} K (${deltaKToDeltaF(k).toFixed(1)} °F)`;
/** A rate of temperature change, K/min with °F/min beside it. */
export const fmtRate = (kPerMin: number): string =>
  `${kPerMin.toFixed(2)} K/min (${deltaKToDeltaF(kPerMin).toFixed(2)} °F/min)`;
export const fmtPressure = (kpa: number): string => `${kpa.toFixed(0)} kPa (${kpaAbsToPsig(kpa).toFixed(0)} psig)`;
