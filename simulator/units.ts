// Unit conversions between the model's SI units and US controller wire units.

/** Standard atmosphere, kPa (plant-reference conventions: 14.696 psia = 101.325 kPa). */
export const atmosphereKPa = 101.325;
/** 1 psi = 6.894757 kPa (plant-reference conventions). */
export const kPaPerPsi = 6.894757;
/** 1 US gpm = 0.0630902 L/s (3.785411784 L / 60 s). */
export const lpsPerGpm = 3.785411784 / 60;
/** 1 refrigeration ton = 3.516853 kW (plant-reference §2). */
export const kWPerTon = 3.516853;
/** Volumetric heat capacity of water, kJ/(L·K) — the SI water-side factor of plant-reference §2. */
export const waterHeatCapacityKJPerLK = 4.186;

export const fToC = (f: number): number => ((f - 32) * 5) / 9;
export const cToF = (c: number): number => (c * 9) / 5 + 32;
/** Temperature differences: °F span → K. */
export const dFToK = (df: number): number => (df * 5) / 9;
export const kToDF = (k: number): number => (k * 9) / 5;
export const psigToKPaAbs = (psig: number): number => (psig + atmosphereKPa / kPaPerPsi) * kPaPerPsi;
export const kPaAbsToPsig = (kPa: number): number => kPa / kPaPerPsi - atmosphereKPa / kPaPerPsi;
export const gpmToLps = (gpm: number): number => gpm * lpsPerGpm;
export const lpsToGpm = (lps: number): number => lps / lpsPerGpm;
export const galToL = (gal: number): number => gal * 3.785411784;
