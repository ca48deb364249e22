// Refrigerant-side temperatures and pressures: lift and heat-exchanger approaches, as
// ASHRAE Handbook—HVAC Systems and Equipment (chillers chapter) defines them.

/** Temperature lift: saturated condensing − saturated evaporating temperature (K). */
export function liftK(condenserSaturatedC: number, evaporatorSaturatedC: number): number {
  return condenserSaturatedC - evaporatorSaturatedC;
}

/** Pressure lift: condenser − evaporator refrigerant pressure (kPa). */
export function pressureLiftKPa(condenserPressureKPa: number, evaporatorPressureKPa: number): number {
  return condenserPressureKPa - evaporatorPressureKPa;
}

/** Condenser approach: saturated condensing − condenser water leaving temperature (K). */
export function condenserApproachK(condenserSaturatedC: number, condenserWaterLeavingC: number): number {
  return condenserSaturatedC - condenserWaterLeavingC;
}

/** Evaporator approach: chilled water leaving − saturated evaporating temperature (K). */
export function evaporatorApproachK(chilledWaterLeavingC: number, evaporatorSaturatedC: number): number {
  return chilledWaterLeavingC - evaporatorSaturatedC;
}
