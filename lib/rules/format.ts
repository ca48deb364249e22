// Numbers in rule messages are stored as quantity tokens (value + kind, canonical SI) and rendered
// in each reader's unit system (lib/quantity-text.ts): °F and psig for one, °C and kPa abs for another.

import { quantityToken } from "@/lib/quantity-text";

export const fmtTemp = (c: number): string => quantityToken("t", c);
export const fmtDelta = (k: number): string => quantityToken("dt", k);
/** A rate of temperature change, K/min canonical. */
export const fmtRate = (kPerMin: number): string => quantityToken("rt", kPerMin);
/** A pressure (kPa absolute), or with `difference` a pressure difference (kPa; no gauge offset). */
export const fmtPressure = (kpa: number, difference = false): string => quantityToken(difference ? "dp" : "p", kpa);
/** A rate of pressure change, kPa/min canonical. */
export const fmtPressureRate = (kpaPerMin: number): string => quantityToken("pr", kpaPerMin);
