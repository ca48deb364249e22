import type { Priority } from "@/lib/alarms/priority";

export const ruleIds = [
  "crossover_risk",
  "restart_race",
  "loops_crossed",
  "tower_fan_not_running",
  "head_pressure_near_trip",
  "drive_temp_toward_trip",
  "power_event_suspected",
  "chiller_tripped",
  "comm_lost",
  "efficiency_drift",
  "low_evaporator_pressure",
  "tower_fan_not_in_auto",
  "starts_per_hour",
  "pump_not_proven",
  "barrel_flow_lost",
  "chilled_water_not_made",
  "sensor_implausible",
] as const;
export type RuleId = (typeof ruleIds)[number];

/** Tag used for conditions about the whole site rather than one piece of equipment. */
export const SITE_TAG = "site";

/** What a rule concludes about one piece of equipment at one event time. */
export interface Condition {
  ruleId: RuleId;
  equipment: string;
  active: boolean;
  priority: Priority;
  atMs: number;
  /** For the on-call technician: what, how much, how soon. */
  technicianMessage: string;
  /** For the building owner: what is happening, in plain words. */
  ownerMessage: string;
  advice: string[];
  caution: string | null;
  /** The derived numbers the conclusion rests on, units in the names. */
  numbers: Record<string, number | null>;
  /** Related items, e.g. the correlated drive faults of a power event. */
  related: string[];
  latching: boolean;
  /** Set while plant state makes this alarm meaningless (ISA-18.2 suppression by design). */
  suppressedReason: string | null;
}

export const QUALIFIED_CAUTION =
  "Safety timers, resets and restarts are for qualified technicians following the manufacturer's procedures and local codes.";
