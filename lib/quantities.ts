// The one point vocabulary of the whole product: gateway point maps, the simulator,
// derived values, rules and screens all speak these keys.
// Words follow Project Haystack 4 / Brick 1.4: water is "entering"/"leaving" relative to the
// equipment the point belongs to (a tower's entering water is the hot condenser water).

/** What a number measures; decides the canonical unit and how it converts. */
export const measures = [
  "temperature", // canonical °C
  "pressure", // canonical kPa absolute
  "differential_pressure", // canonical kPa (a difference, no atmosphere offset)
  "flow", // canonical L/s
  "power", // canonical kW
  "percent", // canonical %
  "frequency", // canonical Hz
  "duration", // canonical s
  "boolean", // true / false
  "state", // a short enumerated string (drive mode)
  "text", // a fault text or log line
] as const;
export type Measure = (typeof measures)[number];

export const canonicalUnits: Record<Measure, string> = {
  temperature: "degC",
  pressure: "kPa",
  differential_pressure: "kPa",
  flow: "L/s",
  power: "kW",
  percent: "%",
  frequency: "Hz",
  duration: "s",
  boolean: "bool",
  state: "state",
  text: "text",
};

/**
 * Bounds, in canonical units, outside which a number is no measurement of a chilled-water plant
 * but a broken sensor, a sentinel or garbage (±1e308 for a percentage). Ingestion refuses such
 * readings (counted as `out_of_range`, gateway/PROTOCOL.md) rather than storing them.
 * Wide on purpose: a reading inside can still be wrong, but nothing plausible falls outside.
 */
export const plausibleRanges = {
  // Below the lowest air temperature on record (−89.2 °C, WMO Weather and Climate Extremes
  // Archive); above anything a water-cooled plant's water, refrigerant or drive reaches (common practice).
  temperature: { min: -90, max: 200 },
  // Absolute pressure cannot be negative; 20 MPa is above the highest working pressure of any
  // chiller refrigerant, CO2 included (common practice).
  pressure: { min: 0, max: 20_000 },
  differential_pressure: { min: -1000, max: 1000 },
  // Flow and power may read slightly negative around zero (meter offset, regeneration).
  flow: { min: -10_000, max: 10_000 },
  power: { min: -100_000, max: 100_000 },
  // Positions, speeds and humidity are 0–100 %; calibration can take them a little past either end.
  percent: { min: -10, max: 150 },
  frequency: { min: 0, max: 1000 },
  // Timers and time left: a week is far beyond any anti-recycle setting.
  duration: { min: 0, max: 7 * 24 * 3600 },
} as const satisfies Partial<Record<Measure, { min: number; max: number }>>;

/** True for a finite number within the measure's plausible range (measures without one: any finite number). */
export function isPlausible(measure: Measure, value: number): boolean {
  if (!Number.isFinite(value)) return false;
  const range = (plausibleRanges as Partial<Record<Measure, { min: number; max: number }>>)[measure];
  return range === undefined || (value >= range.min && value <= range.max);
}

export type EquipmentKind = "chiller" | "cooling_tower" | "pump" | "air_handler" | "weather_station";

export interface QuantityDef {
  measure: Measure;
  label: string;
  /** Brick 1.4 class for the point (REFERENCES.md §9); generic classes where Brick has no dedicated one. */
  brickClass: string;
  /** Allowed values for `state` measures. */
  states?: readonly string[];
}

export const fanDriveModes = ["auto", "off", "hand"] as const;
export type FanDriveMode = (typeof fanDriveModes)[number];

/**
 * Why a chiller's compressor is not running, as its controller reports it: `low_load` and `schedule`
 * restart on their own once the anti-recycle timers allow; `safety` (an auto-reset safety such as
 * low lift or a drive undervoltage) restarts on its own when the condition clears; `trip` is latched
 * until someone resets it; `manual` is disabled by a person.
 */
export const chillerStopReasons = ["running", "low_load", "schedule", "trip", "safety", "manual"] as const;
export type ChillerStopReason = (typeof chillerStopReasons)[number];

export const quantities = {
  // chilled-water side (chiller evaporator)
  chilled_water_entering_temp: {
    measure: "temperature",
    label: "Chilled water entering",
    brickClass: "Entering_Chilled_Water_Temperature_Sensor",
  },
  chilled_water_leaving_temp: {
    measure: "temperature",
    label: "Chilled water leaving",
    brickClass: "Leaving_Chilled_Water_Temperature_Sensor",
  },
  chilled_water_leaving_temp_setpoint: {
    measure: "temperature",
    label: "Chilled water leaving setpoint",
    brickClass: "Leaving_Chilled_Water_Temperature_Setpoint",
  },
  chilled_water_flow: { measure: "flow", label: "Chilled water flow", brickClass: "Chilled_Water_Flow_Sensor" },
  evaporator_water_dp: {
    measure: "differential_pressure",
    label: "Evaporator water ΔP",
    brickClass: "Chilled_Water_Differential_Pressure_Sensor",
  },
  // condenser-water side (chiller condenser, or tower: entering = hot water in, leaving = cold water out)
  condenser_water_entering_temp: {
    measure: "temperature",
    label: "Condenser water entering",
    brickClass: "Entering_Condenser_Water_Temperature_Sensor",
  },
  condenser_water_leaving_temp: {
    measure: "temperature",
    label: "Condenser water leaving",
    brickClass: "Leaving_Condenser_Water_Temperature_Sensor",
  },
  condenser_water_temp_setpoint: {
    measure: "temperature",
    label: "Condenser water setpoint",
    brickClass: "Condenser_Water_Temperature_Setpoint",
  },
  condenser_water_flow: { measure: "flow", label: "Condenser water flow", brickClass: "Condenser_Water_Flow_Sensor" },
  condenser_water_dp: {
    measure: "differential_pressure",
    label: "Condenser water ΔP",
    brickClass: "Differential_Pressure_Sensor",
  },
  // refrigerant circuit
  evaporator_refrigerant_pressure: {
    measure: "pressure",
    label: "Evaporator refrigerant pressure",
    brickClass: "Pressure_Sensor",
  },
  evaporator_saturated_temp: {
    measure: "temperature",
    label: "Evaporator saturated temp",
    brickClass: "Temperature_Sensor",
  },
  condenser_refrigerant_pressure: {
    measure: "pressure",
    label: "Condenser refrigerant pressure",
    brickClass: "Pressure_Sensor",
  },
  condenser_saturated_temp: {
    measure: "temperature",
    label: "Condenser saturated temp",
    brickClass: "Temperature_Sensor",
  },
  // compressor and its drive
  compressor_speed: { measure: "percent", label: "Compressor speed", brickClass: "Motor_Speed_Sensor" },
  inlet_guide_vane_position: { measure: "percent", label: "Inlet guide vane position", brickClass: "Position_Sensor" },
  compressor_power: { measure: "power", label: "Compressor power", brickClass: "Electric_Power_Sensor" },
  drive_temp: { measure: "temperature", label: "Drive temperature", brickClass: "Temperature_Sensor" },
  drive_fault: { measure: "boolean", label: "Drive fault", brickClass: "Fault_Status" },
  run_status: { measure: "boolean", label: "Run status", brickClass: "Run_Status" },
  run_enable_command: { measure: "boolean", label: "Run enable", brickClass: "Run_Enable_Command" },
  chiller_alarm: { measure: "boolean", label: "Latched alarm", brickClass: "Alarm" },
  fault_text: { measure: "text", label: "Last fault", brickClass: "Fault_Status" },
  chiller_stop_reason: {
    measure: "state",
    label: "Stop reason",
    brickClass: "Status",
    states: chillerStopReasons,
  },
  restart_inhibit_time_left: { measure: "duration", label: "Restart inhibit left", brickClass: "Time_Parameter" },
  start_to_start_timer_setting: { measure: "duration", label: "Start-to-start timer", brickClass: "Time_Parameter" },
  stop_to_start_timer_setting: { measure: "duration", label: "Stop-to-start timer", brickClass: "Time_Parameter" },
  // cooling tower fan
  fan_drive_mode: { measure: "state", label: "Fan drive mode", brickClass: "Mode_Status", states: fanDriveModes },
  fan_speed: { measure: "percent", label: "Fan speed", brickClass: "Fan_Speed_Command" },
  fan_status: { measure: "boolean", label: "Fan status", brickClass: "Fan_Status" },
  fan_drive_fault: { measure: "boolean", label: "Fan drive fault", brickClass: "Fault_Status" },
  fan_drive_frequency: { measure: "frequency", label: "Fan drive output", brickClass: "Output_Frequency_Sensor" },
  // Only where the condenser loop has a tower bypass valve (a generic Brick valve class; REFERENCES.md §9 has none dedicated).
  tower_bypass_valve_position: {
    measure: "percent",
    label: "Tower bypass valve",
    brickClass: "Valve_Position_Sensor",
  },
  // pumps
  pump_status: { measure: "boolean", label: "Pump status", brickClass: "Pump_Status" },
  pump_speed: { measure: "percent", label: "Pump speed", brickClass: "Speed_Status" },
  pump_run_command: { measure: "boolean", label: "Pump command", brickClass: "Start_Stop_Command" },
  pump_fault: { measure: "boolean", label: "Pump fault", brickClass: "Fault_Status" },
  // air handlers
  chilled_water_valve_position: {
    measure: "percent",
    label: "Chilled water valve",
    brickClass: "Valve_Position_Sensor",
  },
  // weather station
  outdoor_air_temp: { measure: "temperature", label: "Outdoor air temp", brickClass: "Outside_Air_Temperature_Sensor" },
  outdoor_air_humidity: { measure: "percent", label: "Outdoor humidity", brickClass: "Outside_Air_Humidity_Sensor" },
  outdoor_wet_bulb_temp: {
    measure: "temperature",
    label: "Outdoor wet bulb",
    brickClass: "Outside_Air_Wet_Bulb_Temperature_Sensor",
  },
} as const satisfies Record<string, QuantityDef>;

export type QuantityKey = keyof typeof quantities;

/** Points some equipment of a kind carries and some does not (a tower bypass valve only where one is fitted). */
export const optionalPointsByKind: Partial<Record<EquipmentKind, readonly QuantityKey[]>> = {
  cooling_tower: ["tower_bypass_valve_position"],
};

export function isQuantityKey(key: string): key is QuantityKey {
  return Object.prototype.hasOwnProperty.call(quantities, key);
}

export function canonicalUnitOf(key: QuantityKey): string {
  return canonicalUnits[quantities[key].measure];
}

/** The points each kind of equipment carries, with the interval a healthy gateway reports them at. */
export const pointsByKind: Record<EquipmentKind, readonly QuantityKey[]> = {
  chiller: [
    "chilled_water_entering_temp",
    "chilled_water_leaving_temp",
    "chilled_water_leaving_temp_setpoint",
    "chilled_water_flow",
    "evaporator_water_dp",
    "condenser_water_entering_temp",
    "condenser_water_leaving_temp",
    "condenser_water_flow",
    "condenser_water_dp",
    "evaporator_refrigerant_pressure",
    "evaporator_saturated_temp",
    "condenser_refrigerant_pressure",
    "condenser_saturated_temp",
    "compressor_speed",
    "inlet_guide_vane_position",
    "compressor_power",
    "drive_temp",
    "drive_fault",
    "run_status",
    "run_enable_command",
    "chiller_alarm",
    "fault_text",
    "chiller_stop_reason",
    "restart_inhibit_time_left",
    "start_to_start_timer_setting",
    "stop_to_start_timer_setting",
  ],
  cooling_tower: [
    "condenser_water_entering_temp",
    "condenser_water_leaving_temp",
    "condenser_water_temp_setpoint",
    "fan_drive_mode",
    "fan_speed",
    "fan_status",
    "fan_drive_fault",
    "fan_drive_frequency",
    "fault_text",
  ],
  pump: ["pump_status", "pump_speed", "pump_run_command", "pump_fault"],
  air_handler: ["run_status", "chilled_water_valve_position"],
  weather_station: ["outdoor_air_temp", "outdoor_air_humidity", "outdoor_wet_bulb_temp"],
};
