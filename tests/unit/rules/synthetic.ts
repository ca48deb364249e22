// Synthetic reading streams for rule tests: a one-chiller plant whose points are functions of
// event time, so each test states exactly the physics it wants.
import type { Reading, Site } from "@/lib/plant";
import type { QuantityKey } from "@/lib/quantities";
import { createSiteMonitor, parseRuleSettings, type RuleSettingsInput, type SiteEvaluation } from "@/lib/rules";
import type { CommStatus } from "@/lib/rules";
import type { TransitionRecord } from "@/lib/alarms";
import { saturationPressureKPa, saturationTempC } from "@/lib/refrigerant";
import { effectiveChillerLimits, limitValues, type ChillerLimitValues } from "@/lib/plant/equipment-limits";

export const T0 = Date.UTC(2025, 6, 1, 14, 0, 0);

export const site: Site = [
  // Design flows 2.4 and 3 gpm/ton (AHRI 550/590 rating flows); barrel drops as a rating sheet might state them.
  {
    tag: "CH-1",
    kind: "chiller",
    capacityTons: 400,
    designFlowLps: 60.6,
    cwDesignFlowLps: 75.7,
    evapDesignDpKPa: 60,
    condDesignDpKPa: 50,
    refrigerant: "R-134a",
  },
  { tag: "CT-1", kind: "cooling_tower" },
  { tag: "CHWP-1", kind: "pump", serves: "CH-1", loop: "chilled_water" },
  { tag: "CWP-1", kind: "pump", serves: "CH-1", loop: "condenser_water" },
  { tag: "AHU-1", kind: "air_handler" },
  { tag: "WS-1", kind: "weather_station" },
];

/** The synthetic plant with CH-1's limits as its equipment record would give them: defaults, some entered. */
export function withChillerLimits(entered: Partial<ChillerLimitValues>): Site {
  return site.map((e) =>
    e.kind === "chiller"
      ? { ...e, limits: { ...limitValues(effectiveChillerLimits(e.refrigerant, null, [])), ...entered } }
      : e,
  );
}

export interface Frame {
  chwInC: number;
  chwOutC: number;
  cwInC: number;
  cwOutC: number;
  running: boolean;
  enabled: boolean;
  condKPa: number;
  evapKPa: number;
  /** null: the site reads no saturated temperature (the rules derive it from the pressure). */
  evapSatC: number | null;
  condSatC: number;
  powerKw: number;
  driveC: number;
  driveFault: boolean;
  chillerAlarm: boolean;
  faultText: string;
  inhibitLeftS: number | null;
  /** The controller's `chiller_stop_reason`; null: the site has no such point. */
  stopReason: string | null;
  towerMode: "auto" | "off" | "hand";
  towerFault: boolean;
  fanSpeedPct: number;
  fanRunning: boolean;
  /** null: the site has no condenser-water setpoint point. */
  towerSetpointC: number | null;
  /** Tower entering water (from the chiller); the tower's leaving water is cwInC. */
  towerInC: number;
  wetBulbC: number;
  /** Condenser pump: proven run, command (null: no such point), drive fault. */
  cwPumpStatus: boolean;
  cwPumpCommand: boolean | null;
  cwPumpFault: boolean | null;
  /** Barrel water pressure drops and flows (null: the site has no such point). */
  evapDpKPa: number | null;
  condDpKPa: number | null;
  chwFlowLps: number | null;
  cwFlowLps: number | null;
  /** Equipment that sends nothing this step. */
  silent: string[];
}

/** A chiller running at AHRI-like conditions: 54 → 44 °F, 85 °F condenser water entering. */
export const normalFrame: Frame = {
  chwInC: 12.2,
  chwOutC: 6.7,
  cwInC: 29.4,
  cwOutC: 34.6,
  running: true,
  enabled: true,
  condKPa: 900,
  evapKPa: 350,
  evapSatC: 5.9,
  condSatC: 35.7,
  powerKw: 210,
  driveC: 40,
  driveFault: false,
  chillerAlarm: false,
  faultText: "",
  inhibitLeftS: 0,
  stopReason: null,
  cwPumpStatus: true,
  cwPumpCommand: null,
  cwPumpFault: null,
  towerMode: "auto",
  towerFault: false,
  fanSpeedPct: 60,
  fanRunning: true,
  towerSetpointC: 29.4,
  towerInC: 34.6,
  wetBulbC: 25.5,
  evapDpKPa: null,
  condDpKPa: null,
  chwFlowLps: null,
  cwFlowLps: null,
  silent: [],
};

export function readingsOf(tsMs: number, f: Frame): Reading[] {
  const out: Reading[] = [];
  const add = (equipment: string, quantity: QuantityKey, value: number | boolean | string | null) => {
    if (value !== null && !f.silent.includes(equipment)) out.push({ tsMs, equipment, quantity, value });
  };
  add("CH-1", "chilled_water_entering_temp", f.chwInC);
  add("CH-1", "chilled_water_leaving_temp", f.chwOutC);
  add("CH-1", "condenser_water_entering_temp", f.cwInC);
  add("CH-1", "condenser_water_leaving_temp", f.cwOutC);
  add("CH-1", "run_status", f.running);
  add("CH-1", "run_enable_command", f.enabled);
  add("CH-1", "condenser_refrigerant_pressure", f.condKPa);
  add("CH-1", "evaporator_refrigerant_pressure", f.evapKPa);
  add("CH-1", "evaporator_saturated_temp", f.evapSatC);
  add("CH-1", "condenser_saturated_temp", f.condSatC);
  add("CH-1", "compressor_power", f.running ? f.powerKw : 0);
  add("CH-1", "drive_temp", f.driveC);
  add("CH-1", "drive_fault", f.driveFault);
  add("CH-1", "chiller_alarm", f.chillerAlarm);
  add("CH-1", "fault_text", f.faultText);
  add("CH-1", "restart_inhibit_time_left", f.inhibitLeftS);
  add("CH-1", "chiller_stop_reason", f.stopReason);
  add("CT-1", "condenser_water_entering_temp", f.towerInC);
  add("CT-1", "condenser_water_leaving_temp", f.cwInC);
  add("CT-1", "condenser_water_temp_setpoint", f.towerSetpointC);
  add("CT-1", "fan_drive_mode", f.towerMode);
  add("CT-1", "fan_drive_fault", f.towerFault);
  add("CT-1", "fan_speed", f.fanSpeedPct);
  add("CT-1", "fan_status", f.fanRunning);
  add("CH-1", "evaporator_water_dp", f.evapDpKPa);
  add("CH-1", "condenser_water_dp", f.condDpKPa);
  add("CH-1", "chilled_water_flow", f.chwFlowLps);
  add("CH-1", "condenser_water_flow", f.cwFlowLps);
  add("CHWP-1", "pump_status", true);
  add("CWP-1", "pump_status", f.cwPumpStatus);
  add("CWP-1", "pump_run_command", f.cwPumpCommand);
  add("CWP-1", "pump_fault", f.cwPumpFault);
  add("AHU-1", "run_status", true);
  add("WS-1", "outdoor_wet_bulb_temp", f.wetBulbC);
  return out;
}

export interface RunResult {
  transitions: TransitionRecord[];
  evaluations: SiteEvaluation[];
  /** Event times at which each alarm key first went to unacknowledged. */
  firstActivation(key: string): number | null;
  activations(key: string): number;
}

/** Feeds frames every stepS and evaluates after each; the same clock for readings and rules. */
/**
 * A frame as a chiller's controller reports it: a shell's saturated temperature and pressure agree on the
 * R-134a curve, so a test that moves one moves the other (the sensor plausibility check compares them).
 */
function consistentFrame(partial: Partial<Frame>): Frame {
  const f = { ...normalFrame, ...partial };
  if (partial.evapSatC != null && partial.evapKPa === undefined)
    f.evapKPa = saturationPressureKPa("R-134a", partial.evapSatC);
  if (partial.evapKPa !== undefined && partial.evapSatC === undefined)
    f.evapSatC = saturationTempC("R-134a", partial.evapKPa);
  if (partial.condSatC !== undefined && partial.condKPa === undefined)
    f.condKPa = saturationPressureKPa("R-134a", partial.condSatC);
  if (partial.condKPa !== undefined && partial.condSatC === undefined)
    f.condSatC = saturationTempC("R-134a", partial.condKPa);
  return f;
}

export function runFrames(args: {
  durationS: number;
  stepS?: number;
  frame: (tS: number) => Partial<Frame>;
  settings?: RuleSettingsInput;
  comms?: (tS: number) => CommStatus;
  keep?: boolean;
  /** The site's IANA time zone (clock times in messages). */
  timeZone?: string;
  /** Another plant than the default one (e.g. a chiller with entered limits: `withChillerLimits`). */
  site?: Site;
}): RunResult {
  const stepS = args.stepS ?? 10;
  const monitor = createSiteMonitor({
    site: args.site ?? site,
    settings: parseRuleSettings(args.settings ?? {}),
    timeZone: args.timeZone,
  });
  const transitions: TransitionRecord[] = [];
  const evaluations: SiteEvaluation[] = [];
  for (let tS = 0; tS <= args.durationS; tS += stepS) {
    const tsMs = T0 + tS * 1000;
    monitor.ingest(readingsOf(tsMs, consistentFrame(args.frame(tS))));
    const e = monitor.evaluate(tsMs, args.comms?.(tS));
    transitions.push(...e.transitions);
    if (args.keep) evaluations.push(e);
  }
  const acts = (key: string) =>
    transitions.filter((t) => t.alarmKey === key && t.cause === "condition_active" && t.to === "unacknowledged");
  return {
    transitions,
    evaluations,
    firstActivation: (key) => acts(key)[0]?.atMs ?? null,
    activations: (key) => acts(key).length,
  };
}

/** Seconds after T0. */
export const secondsOf = (ms: number | null): number | null => (ms === null ? null : (ms - T0) / 1000);
