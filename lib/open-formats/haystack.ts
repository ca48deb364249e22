import { quantities, type Measure, type QuantityKey } from "@/lib/quantities";
import { pumpLoop, type ModelEquipment, type SiteModel } from "./model";

// A site's model as a Project Haystack grid in the JSON encoding (project-haystack.org/doc/docHaystack/Json,
// the "v3" form Haystack 4 servers still read): {"meta":{"ver":"3.0"},"cols":[{"name":…}],"rows":[…]},
// values as strings with a type prefix — "m:" marker, "r:<id> <dis>" ref, "n:<num> <unit>" number,
// "s:" a string that would otherwise read as typed. Tags per plant-reference.md §9 (Haystack 4:
// water is entering/leaving, never supply/return).

export interface HaystackGrid {
  meta: { ver: "3.0" } & Record<string, unknown>;
  cols: Array<{ name: string }>;
  rows: Array<Record<string, unknown>>;
}

const MARKER = "m:";

/** A Haystack string: prefixed with "s:" when it would otherwise read as another type ("x:..."). */
export function hayStr(value: string): string {
  return /^.:/.test(value) ? `s:${value}` : value;
}

/** A Haystack id: letters, digits and `_ : - . ~` only (Haystack Ref grammar); anything else becomes "_". */
export function hayId(...parts: string[]): string {
  return parts.map((p) => p.replace(/[^A-Za-z0-9_:\-.~]/g, "_")).join(".");
}

export const hayRef = (id: string, dis?: string) => (dis ? `r:${id} ${dis}` : `r:${id}`);

/** Canonical units as Haystack unit names (the Haystack unit database). */
export const haystackUnits: Record<string, string> = {
  degC: "°C",
  kPa: "kPa",
  "L/s": "L/s",
  kW: "kW",
  "%": "%",
  Hz: "Hz",
  s: "s",
};

/** Haystack `kind` of a point's value. */
function pointKind(measure: Measure): "Number" | "Bool" | "Str" {
  if (measure === "boolean") return "Bool";
  if (measure === "state" || measure === "text") return "Str";
  return "Number";
}

/** Marker tags of each quantity's point besides `point` and `his` (plant-reference.md §9; Haystack 4 tag defs). */
export const pointTags: Record<QuantityKey, readonly string[]> = {
  chilled_water_entering_temp: ["chilled", "water", "entering", "temp", "sensor"],
  chilled_water_leaving_temp: ["chilled", "water", "leaving", "temp", "sensor"],
  chilled_water_leaving_temp_setpoint: ["chilled", "water", "leaving", "temp", "sp"],
  chilled_water_flow: ["chilled", "water", "flow", "sensor"],
  evaporator_water_dp: ["chilled", "water", "delta", "pressure", "sensor"],
  condenser_water_entering_temp: ["condenser", "water", "entering", "temp", "sensor"],
  condenser_water_leaving_temp: ["condenser", "water", "leaving", "temp", "sensor"],
  condenser_water_temp_setpoint: ["condenser", "water", "temp", "sp"],
  condenser_water_flow: ["condenser", "water", "flow", "sensor"],
  condenser_water_dp: ["condenser", "water", "delta", "pressure", "sensor"],
  evaporator_refrigerant_pressure: ["evaporator", "refrig", "pressure", "sensor"],
  evaporator_saturated_temp: ["evaporator", "refrig", "temp", "sensor"],
  condenser_refrigerant_pressure: ["condenser", "refrig", "pressure", "sensor"],
  condenser_saturated_temp: ["condenser", "refrig", "temp", "sensor"],
  compressor_speed: ["compressor", "vfd", "speed", "sensor"],
  inlet_guide_vane_position: ["compressor", "sensor"],
  compressor_power: ["elec", "power", "sensor"],
  drive_temp: ["vfd", "temp", "sensor"],
  drive_fault: ["vfd", "fault", "sensor"],
  run_status: ["run", "sensor"],
  run_enable_command: ["enable", "cmd"],
  chiller_stop_reason: ["run", "sensor"],
  tower_bypass_valve_position: ["condenser", "water", "bypass", "valve", "sensor"],
  pump_run_command: ["pump", "run", "cmd"],
  pump_fault: ["pump", "fault", "sensor"],
  chiller_alarm: ["alarm", "sensor"],
  fault_text: ["fault", "sensor"],
  restart_inhibit_time_left: ["sensor"],
  start_to_start_timer_setting: ["sp"],
  stop_to_start_timer_setting: ["sp"],
  fan_drive_mode: ["fan", "vfd", "sensor"],
  fan_speed: ["fan", "vfd", "speed", "cmd"],
  fan_status: ["fan", "run", "sensor"],
  fan_drive_fault: ["fan", "vfd", "fault", "sensor"],
  fan_drive_frequency: ["fan", "vfd", "freq", "sensor"],
  pump_status: ["pump", "run", "sensor"],
  pump_speed: ["pump", "vfd", "speed", "sensor"],
  chilled_water_valve_position: ["chilled", "water", "valve", "sensor"],
  outdoor_air_temp: ["outside", "air", "temp", "sensor"],
  outdoor_air_humidity: ["outside", "air", "humidity", "sensor"],
  outdoor_wet_bulb_temp: ["outside", "air", "wetBulb", "temp", "sensor"],
};

/** Marker tags of a piece of equipment besides `equip`. */
export function equipTags(e: Pick<ModelEquipment, "kind" | "name" | "record">): string[] {
  switch (e.kind) {
    case "chiller":
      return ["chiller"];
    case "cooling_tower":
      return ["coolingTower"];
    case "pump": {
      const loop = pumpLoop(e);
      return loop === "chilled_water"
        ? ["pump", "chilled", "water"]
        : loop === "condenser_water"
          ? ["pump", "condenser", "water"]
          : ["pump"];
    }
    case "air_handler":
      return ["ahu"];
    case "weather_station":
      // Haystack 4 makes a weather station its own entity (points carry weatherStationRef);
      // it is also tagged equip here so every point has an equipRef, as for the rest of the plant.
      return ["weatherStation"];
  }
}

/** The site, its equipment and its points as one Haystack grid. */
export function haystackGrid(model: SiteModel): HaystackGrid {
  const siteId = hayId(model.site.id);
  const siteRef = hayRef(siteId, model.site.name);
  const rows: Array<Record<string, unknown>> = [];
  rows.push({
    id: siteRef,
    dis: hayStr(model.site.name),
    site: MARKER,
    tz: hayStr(model.site.timeZone.split("/").pop() ?? model.site.timeZone),
    geoAddr: hayStr(model.site.address),
    primaryFunction: hayStr(model.site.kind),
  });
  const equipRefs = new Map<string, { ref: string; tag: string; kind: string }>();
  for (const e of model.equipment) {
    const ref = hayRef(hayId(model.site.id, e.tag), e.name);
    equipRefs.set(e.id, { ref, tag: e.tag, kind: e.kind });
    const row: Record<string, unknown> = {
      id: ref,
      dis: hayStr(e.name),
      navName: hayStr(e.tag),
      equip: MARKER,
      siteRef,
    };
    for (const t of equipTags(e)) row[t] = MARKER;
    if (e.kind === "chiller" && e.refrigerant) row.refrigerant = hayStr(e.refrigerant);
    rows.push(row);
  }
  for (const p of model.points) {
    const equip = equipRefs.get(p.equipmentId);
    if (!equip) continue;
    const q = quantities[p.quantity];
    const row: Record<string, unknown> = {
      id: hayRef(hayId(model.site.id, equip.tag, p.key), `${equip.tag} ${q.label}`),
      dis: hayStr(`${equip.tag} ${q.label}`),
      navName: hayStr(q.label),
      point: MARKER,
      his: MARKER,
      kind: pointKind(q.measure),
      equipRef: equip.ref,
      siteRef,
    };
    if (equip.kind === "weather_station") row.weatherStationRef = equip.ref;
    const unit = haystackUnits[p.unit];
    if (unit && row.kind === "Number") row.unit = unit;
    if (q.measure === "state" && "states" in q) row.enum = hayStr(q.states.join(","));
    for (const t of pointTags[p.quantity]) row[t] = MARKER;
    if (p.lowLimit !== null) row.minVal = `n:${p.lowLimit}${unit ? ` ${unit}` : ""}`;
    if (p.highLimit !== null) row.maxVal = `n:${p.highLimit}${unit ? ` ${unit}` : ""}`;
    rows.push(row);
  }
  const names = new Set<string>();
  for (const r of rows) for (const k of Object.keys(r)) names.add(k);
  // id and dis first, as Haystack grids conventionally list them.
  const ordered = ["id", "dis", ...[...names].filter((n) => n !== "id" && n !== "dis").sort()];
  return { meta: { ver: "3.0", siteRef }, cols: ordered.map((name) => ({ name })), rows };
}
