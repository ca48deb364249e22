// Water-side heat transfer: the sensible-heat equation q = ṁ·cp·ΔT in the forms the
// ASHRAE Handbook—Fundamentals and REFERENCES.md §2 give.

import { kwToTons } from "./units";

/**
 * Volumetric heat capacity of water, kJ/(L·K), as the usual SI form kW = L/s × 4.186 × ΔT
 * uses it (REFERENCES.md §2 [C]); true ρ·cp is 4.200 at 7 °C and 4.162 at 30 °C (IAPWS-95).
 */
export const WATER_KJ_PER_L_K = 4.186;

/** Evaporator ΔT: chilled water entering − leaving (K); positive while the chiller cools. */
export function evaporatorDeltaTK(chilledWaterEnteringC: number, chilledWaterLeavingC: number): number {
  return chilledWaterEnteringC - chilledWaterLeavingC;
}

/** Condenser ΔT: condenser water leaving − entering (K); positive while the chiller rejects heat. */
export function condenserDeltaTK(condenserWaterEnteringC: number, condenserWaterLeavingC: number): number {
  return condenserWaterLeavingC - condenserWaterEnteringC;
}

/** Heat flow in kW from flow and ΔT: kW = L/s × 4.186 × ΔT(K) (REFERENCES.md §2, SI form). */
export function waterLoadKw(flowLps: number, deltaTK: number): number {
  return flowLps * WATER_KJ_PER_L_K * deltaTK;
}

export function waterLoadTons(flowLps: number, deltaTK: number): number {
  return kwToTons(waterLoadKw(flowLps, deltaTK));
}

/** I-P: Btu/h = 500 × gpm × ΔT(°F) (ASHRAE Handbook; REFERENCES.md §2 [C]). */
export function btuPerHourIp(gpm: number, deltaTF: number): number {
  return 500 * gpm * deltaTF;
}

/** I-P: tons = gpm × ΔT(°F) / 24 (REFERENCES.md §2 [C]); 500 / 12 000 = 1/24. */
export function tonsIp(gpm: number, deltaTF: number): number {
  return (gpm * deltaTF) / 24;
}

/** Flow the load is computed from: measured if reported, else design flow while the pumps are proven. */
export function effectiveFlowLps(args: {
  measuredFlowLps: number | null;
  designFlowLps?: number;
  pumpsProven: boolean;
}): { flowLps: number; source: "measured" | "design" } | null {
  if (args.measuredFlowLps !== null) return { flowLps: args.measuredFlowLps, source: "measured" };
  if (args.designFlowLps !== undefined && args.pumpsProven) return { flowLps: args.designFlowLps, source: "design" };
  return null;
}
