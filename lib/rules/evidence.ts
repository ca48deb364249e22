// The readings each rule rests on, as an alarm shows them: what they read when it was raised, what
// they read now, and their trends. Read on the alarm's own equipment, and for a chiller also on the
// towers and pumps serving it (its condenser water may come from the tower's sensor).

import type { Equipment, Site } from "@/lib/plant/site";
import { towersServing } from "@/lib/plant/site";
import type { QuantityKey } from "@/lib/quantities";
import type { RuleId } from "./condition";
import { plausibleRange } from "./plausibility";

const crossover: QuantityKey[] = [
  "chilled_water_entering_temp",
  "condenser_water_entering_temp",
  "evaporator_refrigerant_pressure",
  "condenser_refrigerant_pressure",
];

export const evidenceOf: Record<RuleId, readonly QuantityKey[]> = {
  crossover_risk: crossover,
  restart_race: [...crossover, "restart_inhibit_time_left"],
  loops_crossed: crossover,
  tower_fan_not_running: ["condenser_water_leaving_temp", "fan_speed", "fan_drive_mode"],
  head_pressure_near_trip: ["condenser_refrigerant_pressure", "condenser_water_entering_temp", "compressor_power"],
  drive_temp_toward_trip: ["drive_temp", "compressor_power", "condenser_refrigerant_pressure"],
  power_event_suspected: [],
  chiller_tripped: ["compressor_power", "condenser_refrigerant_pressure", "drive_temp"],
  comm_lost: [],
  efficiency_drift: ["compressor_power", "condenser_water_entering_temp"],
  low_evaporator_pressure: [
    "evaporator_refrigerant_pressure",
    "evaporator_saturated_temp",
    "chilled_water_leaving_temp",
  ],
  tower_fan_not_in_auto: ["fan_drive_mode", "fan_speed", "condenser_water_leaving_temp"],
  starts_per_hour: ["compressor_power", "chilled_water_leaving_temp"],
  pump_not_proven: ["pump_run_command", "pump_status", "pump_fault"],
  barrel_flow_lost: [
    "evaporator_water_dp",
    "chilled_water_flow",
    "condenser_water_dp",
    "condenser_water_flow",
    "condenser_refrigerant_pressure",
  ],
  chilled_water_not_made: ["chilled_water_leaving_temp", "chilled_water_leaving_temp_setpoint", "compressor_power"],
  // Every reading the plausibility checks watch: the failed ones among them.
  sensor_implausible: Object.keys(plausibleRange) as QuantityKey[],
};

export interface EvidencePoint {
  tag: string;
  quantity: QuantityKey;
}

/**
 * Where each of the rule's readings is found at this site: on the equipment itself first, else on a
 * tower serving the chiller (condenser water leaving the tower is the water entering the chiller).
 */
export function evidencePoints(
  site: Site,
  ruleId: string,
  tag: string,
  has: (tag: string, quantity: QuantityKey) => boolean,
): EvidencePoint[] {
  const wanted = evidenceOf[ruleId as RuleId] ?? [];
  const own = site.find((e) => e.tag === tag);
  const towers: Equipment[] = own?.kind === "chiller" ? towersServing(site, tag) : [];
  const out: EvidencePoint[] = [];
  for (const quantity of wanted) {
    if (has(tag, quantity)) out.push({ tag, quantity });
    else if (quantity === "condenser_water_entering_temp") {
      const tower = towers.find((t) => has(t.tag, "condenser_water_leaving_temp"));
      if (tower) out.push({ tag: tower.tag, quantity: "condenser_water_leaving_temp" });
    }
  }
  return out;
}
