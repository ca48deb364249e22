// Unit conversions. Constants as REFERENCES.md §2 and the conventions line state them.

/** 1 ton of refrigeration = 12 000 Btu/h = 3.516853 kW (REFERENCES.md §2 [K]). */
export const KW_PER_TON = 3.516853;
/** 1 US gpm = 0.0630901964 L/s (3.785411784 L / 60 s, exact by definition of the US gallon). */
export const LPS_PER_GPM = 3.785411784 / 60;
/** 1 psi = 6.894757 kPa; 14.696 psia = 101.325 kPa (REFERENCES.md conventions). */
export const KPA_PER_PSI = 6.894757;
export const ATMOSPHERE_KPA = 101.325;

export const cToF = (c: number): number => (c * 9) / 5 + 32;
export const fToC = (f: number): number => ((f - 32) * 5) / 9;
/** A temperature difference (K) as °F difference. */
export const deltaKToDeltaF = (k: number): number => (k * 9) / 5;
export const deltaFToDeltaK = (f: number): number => (f * 5) / 9;

export const kwToTons = (kw: number): number => kw / KW_PER_TON;
export const tonsToKw = (tons: number): number => tons * KW_PER_TON;
export const lpsToGpm = (lps: number): number => lps / LPS_PER_GPM;
export const gpmToLps = (gpm: number): number => gpm * LPS_PER_GPM;
export const kpaToPsia = (kpa: number): number => kpa / KPA_PER_PSI;
export const kpaAbsToPsig = (kpa: number): number => (kpa - ATMOSPHERE_KPA) / KPA_PER_PSI;
export const psigToKpaAbs = (psig: number): number => psig * KPA_PER_PSI + ATMOSPHERE_KPA;

/** Volumetric heat capacity of water, kJ/(L·K): the SI water-side factor of REFERENCES.md §2. */
export const WATER_HEAT_CAPACITY_KJ_PER_LK = 4.186;
/** 1 US gallon = 3.785411784 L (exact). */
export const galToL = (gal: number): number => gal * 3.785411784;
