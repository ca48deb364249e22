// Chiller efficiency measures (REFERENCES.md §2, §3).

import { KW_PER_TON } from "./units";

/** kW/ton = input kW ÷ refrigeration tons; null when there is no load to divide by. */
export function kwPerTon(compressorPowerKw: number, loadTons: number): number | null {
  return loadTons > 0 ? compressorPowerKw / loadTons : null;
}

/** COP = cooling kW ÷ input kW (dimensionless). */
export function cop(coolingKw: number, compressorPowerKw: number): number | null {
  return compressorPowerKw > 0 ? coolingKw / compressorPowerKw : null;
}

/** COP = 3.516853 / (kW/ton) (REFERENCES.md §2 [K]). */
export function copFromKwPerTon(kwPerTonValue: number): number {
  return KW_PER_TON / kwPerTonValue;
}

export function kwPerTonFromCop(copValue: number): number {
  return KW_PER_TON / copValue;
}

/** EER = 12 / (kW/ton) (REFERENCES.md §2 [K]). */
export function eerFromKwPerTon(kwPerTonValue: number): number {
  return 12 / kwPerTonValue;
}

/**
 * AHRI 550/590 IPLV with efficiencies in kW/ton (REFERENCES.md §3 [C]):
 * IPLV = 1 / (0.01/A + 0.42/B + 0.45/C + 0.12/D), A…D at 100/75/50/25 % load.
 * Averaging kW/ton directly would be wrong.
 */
export function iplvKwPerTon(a: number, b: number, c: number, d: number): number {
  return 1 / (0.01 / a + 0.42 / b + 0.45 / c + 0.12 / d);
}

/** AHRI 550/590 IPLV with efficiencies as COP or EER: 0.01A + 0.42B + 0.45C + 0.12D. */
export function iplvCop(a: number, b: number, c: number, d: number): number {
  return 0.01 * a + 0.42 * b + 0.45 * c + 0.12 * d;
}
