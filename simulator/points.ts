// Controller-style point names, the point map, and conversion between canonical SI and wire units.
import type { PointMapRow } from "@/lib/point-map-csv";
import { optionalPointsByKind, pointsByKind, quantities, type EquipmentKind, type QuantityKey } from "@/lib/quantities";
import { ipWireUnits, type WireUnitCode } from "@/lib/units";
import { equipmentOf, type SiteLayout } from "./layout";
import { cToF, fToC, gpmToLps, KPA_PER_PSI, kpaAbsToPsig, lpsToGpm, psigToKpaAbs } from "@/lib/plant/units";

/** Point-name suffix per quantity, by equipment kind where the same quantity means different sensors. */
const chillerSuffix: Partial<Record<QuantityKey, string>> = {
  chilled_water_entering_temp: "ECHWT",
  chilled_water_leaving_temp: "LCHWT",
  chilled_water_leaving_temp_setpoint: "LCHWT-SP",
  chilled_water_flow: "CHW-FLOW",
  evaporator_water_dp: "EVAP-DP",
  condenser_water_entering_temp: "ECWT",
  condenser_water_leaving_temp: "LCWT",
  condenser_water_flow: "CW-FLOW",
  condenser_water_dp: "COND-DP",
  evaporator_refrigerant_pressure: "EVAP-PRESS",
  evaporator_saturated_temp: "EVAP-SAT",
  condenser_refrigerant_pressure: "COND-PRESS",
  condenser_saturated_temp: "COND-SAT",
  compressor_speed: "COMP-SPD",
  inlet_guide_vane_position: "IGV-POS",
  compressor_power: "KW",
  drive_temp: "DRV-TEMP",
  drive_fault: "DRV-FLT",
  run_status: "RUN",
  run_enable_command: "ENABLE",
  chiller_alarm: "ALARM",
  fault_text: "FAULT",
  chiller_stop_reason: "STOP-RSN",
  restart_inhibit_time_left: "INHIBIT-LEFT",
  start_to_start_timer_setting: "STS-TMR",
  stop_to_start_timer_setting: "SPS-TMR",
};
const towerSuffix: Partial<Record<QuantityKey, string>> = {
  condenser_water_entering_temp: "ECWT",
  condenser_water_leaving_temp: "LCWT",
  condenser_water_temp_setpoint: "CWT-SP",
  fan_drive_mode: "FAN-MODE",
  fan_speed: "FAN-SPD",
  fan_status: "FAN-STS",
  fan_drive_fault: "FAN-FLT",
  fan_drive_frequency: "FAN-HZ",
  fault_text: "FAULT",
  tower_bypass_valve_position: "BYP-POS",
};
const otherSuffix: Partial<Record<QuantityKey, string>> = {
  pump_status: "STS",
  pump_speed: "SPD",
  pump_run_command: "CMD",
  pump_fault: "FLT",
  run_status: "RUN",
  chilled_water_valve_position: "CHWV",
  outdoor_air_temp: "OAT",
  outdoor_air_humidity: "OARH",
  outdoor_wet_bulb_temp: "OAWB",
};

/** `CH-1` + LCHWT → `CH1-LCHWT`. */
export function pointName(equipment: string, kind: string, quantity: QuantityKey): string {
  const table = kind === "chiller" ? chillerSuffix : kind === "cooling_tower" ? towerSuffix : otherSuffix;
  const suffix = table[quantity];
  if (!suffix) throw new Error(`no point name for ${quantity} on ${kind}`);
  return `${equipment.replace("-", "")}-${suffix}`;
}

/** The simulated controllers report in IP units. */
export function wireUnitOf(quantity: QuantityKey): WireUnitCode {
  return ipWireUnits[quantities[quantity].measure];
}

/** The quantities one piece of equipment of this site carries: its kind's points plus the optional ones it has. */
export function pointsOf(layout: SiteLayout, kind: EquipmentKind): QuantityKey[] {
  const optional = (optionalPointsByKind[kind] ?? []).filter(
    (q) => q !== "tower_bypass_valve_position" || layout.towerBypass,
  );
  return [...pointsByKind[kind], ...optional];
}

/** The point map of a site: every point the simulated gateway publishes, in a stable order. */
export function pointMapRows(layout: SiteLayout): PointMapRow[] {
  const rows: PointMapRow[] = [];
  for (const eq of equipmentOf(layout)) {
    for (const q of pointsOf(layout, eq.kind))
      rows.push({ gateway_point: pointName(eq.tag, eq.kind, q), equipment: eq.tag, quantity: q, unit: wireUnitOf(q) });
  }
  return rows;
}

export function pointMapCsv(layout: SiteLayout): string {
  return (
    [
      "gateway_point,equipment,quantity,unit",
      ...pointMapRows(layout).map((r) => `${r.gateway_point},${r.equipment},${r.quantity},${r.unit}`),
    ].join("\n") + "\n"
  );
}

type Value = number | boolean | string;

/** Canonical SI value → wire value (°C→°F, kPa abs→psig, kPa→psid, L/s→gpm; others unchanged). */
export function toWire(quantity: QuantityKey, value: Value): Value {
  if (typeof value !== "number") return value;
  switch (quantities[quantity].measure) {
    case "temperature":
      return cToF(value);
    case "pressure":
      return kpaAbsToPsig(value);
    case "differential_pressure":
      return value / KPA_PER_PSI;
    case "flow":
      return lpsToGpm(value);
    default:
      return value;
  }
}

/** Wire value → canonical SI value (inverse of toWire). */
export function fromWire(quantity: QuantityKey, value: Value): Value {
  if (typeof value !== "number") return value;
  switch (quantities[quantity].measure) {
    case "temperature":
      return fToC(value);
    case "pressure":
      return psigToKpaAbs(value);
    case "differential_pressure":
      return value * KPA_PER_PSI;
    case "flow":
      return gpmToLps(value);
    default:
      return value;
  }
}

/** Decimal places a controller would report per wire unit. */
export function wireDecimals(quantity: QuantityKey): number {
  switch (quantities[quantity].measure) {
    case "temperature":
    case "pressure":
    case "differential_pressure":
      return 2;
    case "flow":
    case "power":
    case "percent":
    case "frequency":
      return 1;
    case "duration":
      return 0;
    default:
      return 0;
  }
}

export function formatWireValue(quantity: QuantityKey, value: Value): string {
  const w = toWire(quantity, value);
  if (typeof w === "number") return w.toFixed(wireDecimals(quantity));
  if (typeof w === "boolean") return w ? "true" : "false";
  return w;
}

/** A wire value as published in JSON (rounded number, boolean, or string). */
export function wireValue(quantity: QuantityKey, value: Value): Value {
  const w = toWire(quantity, value);
  if (typeof w !== "number") return w;
  const f = 10 ** wireDecimals(quantity);
  return Math.round(w * f) / f;
}
