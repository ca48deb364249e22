// Unit conversions between the model's SI units and US controller wire units. The factors are
// the domain's own (lib/plant/units.ts); only the names the model uses and its water constants
// live here.
import { ATMOSPHERE_KPA, KPA_PER_PSI, KW_PER_TON, LPS_PER_GPM, cToF, deltaFToDeltaK, deltaKToDeltaF, fToC, gpmToLps, kpaAbsToPsig, lpsToGpm, psigToKpaAbs } from "@/lib/plant/units";

export { cToF, fToC, gpmToLps, lpsToGpm };
export const atmosphereKPa = ATMOSPHERE_KPA;
export const kPaPerPsi = KPA_PER_PSI;
export const lpsPerGpm = LPS_PER_GPM;
export const kWPerTon = KW_PER_TON;
/** Temperature differences: °F span → K, and back. */
export const dFToK = deltaFToDeltaK;
export const kToDF = deltaKToDeltaF;
export const psigToKPaAbs = psigToKpaAbs;
export const kPaAbsToPsig = kpaAbsToPsig;

/** Volumetric heat capacity of water, kJ/(L·K) — the SI water-side factor of REFERENCES.md §2. */
export const waterHeatCapacityKJPerLK = 4.186;
/** 1 US gallon = 3.785411784 L (exact). */
export const galToL = (gal: number): number => gal * 3.785411784;
