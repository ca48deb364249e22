import { refrigerants } from "@/lib/refrigerant";
import type { UnitSystem } from "@/lib/units";
import { compressorTypeLabels, compressorTypes } from "./equipment-limits";
import { recordFromDisplay, recordToDisplay, recordUnitLabel, type RecordMeasure } from "./record-units";

// The fields of the equipment form, per kind, as lib/schemas/equipment.ts names them. The form
// holds what the viewer typed (their unit system, text); `formToBody` gives the API's canonical body.

export const equipmentKinds = ["chiller", "cooling_tower", "pump", "air_handler", "weather_station"] as const;
export type EquipmentKindName = (typeof equipmentKinds)[number];

export const equipmentKindLabels: Record<EquipmentKindName, string> = {
  chiller: "Chiller",
  cooling_tower: "Cooling tower",
  pump: "Pump",
  air_handler: "Air handler",
  weather_station: "Weather station",
};

export type EquipmentField =
  | { name: string; label: string; type: "number"; measure: RecordMeasure; required?: boolean; hint?: string }
  | { name: string; label: string; type: "select"; options: { value: string; label: string }[]; required?: boolean }
  | { name: string; label: string; type: "text"; hint?: string }
  | { name: "serves"; label: string; type: "serves" };

const nameplate: EquipmentField[] = [
  { name: "model", label: "Nameplate model number", type: "text" },
  { name: "serial", label: "Nameplate serial number", type: "text" },
  { name: "year", label: "Year built", type: "text", hint: "As on the nameplate" },
];

/** The kind's own fields (tag and name come first for every kind). */
export function equipmentFields(kind: EquipmentKindName, system: UnitSystem): EquipmentField[] {
  switch (kind) {
    case "chiller":
      return [
        {
          // The schema takes tons or kW; the form asks in the viewer's system.
          name: system === "ip" ? "capacityTons" : "capacityKW",
          label: "Capacity",
          type: "number",
          measure: system === "ip" ? "capacityTons" : "capacityKW",
          required: true,
        },
        {
          name: "refrigerant",
          label: "Refrigerant",
          type: "select",
          required: true,
          options: refrigerants.map((r) => ({ value: r, label: r })),
        },
        {
          name: "compressorType",
          label: "Compressor type",
          type: "select",
          required: true,
          options: compressorTypes.map((c) => ({ value: c, label: compressorTypeLabels[c] })),
        },
        { name: "chwDesignFlowLps", label: "Design chilled-water flow", type: "number", measure: "flowLps" },
        { name: "chwEnteringDesignC", label: "Design chilled water entering", type: "number", measure: "tempC" },
        { name: "chwLeavingDesignC", label: "Design chilled water leaving", type: "number", measure: "tempC" },
        { name: "cwDesignFlowLps", label: "Design condenser-water flow", type: "number", measure: "flowLps" },
        { name: "cwEnteringDesignC", label: "Design condenser water entering", type: "number", measure: "tempC" },
        { name: "cwLeavingDesignC", label: "Design condenser water leaving", type: "number", measure: "tempC" },
        {
          name: "evapDesignDpKPa",
          label: "Evaporator water pressure drop at design flow",
          type: "number",
          measure: "headKPa",
          hint: "From the chiller's rating sheet; without it a barrel losing flow is not seen",
        },
        {
          name: "condDesignDpKPa",
          label: "Condenser water pressure drop at design flow",
          type: "number",
          measure: "headKPa",
          hint: "From the chiller's rating sheet; without it a barrel losing flow is not seen",
        },
        ...nameplate,
      ];
    case "cooling_tower":
      return [
        { name: "serves", label: "Serves", type: "serves" },
        { name: "capacityTons", label: "Capacity", type: "number", measure: "capacityTons", required: true },
        {
          name: "fanDrive",
          label: "Fan drive",
          type: "select",
          required: true,
          options: [
            { value: "single_speed", label: "Single speed" },
            { value: "variable_speed", label: "Variable speed" },
          ],
        },
        {
          name: "condenserWaterSetpointC",
          label: "Condenser-water setpoint",
          type: "number",
          measure: "tempC",
          required: true,
        },
        {
          name: "fanMinSpeedPct",
          label: "Fan low speed limit",
          type: "number",
          measure: "percent",
          hint: "Variable-speed drives only",
        },
        ...nameplate,
      ];
    case "pump":
      return [
        { name: "serves", label: "Serves", type: "serves" },
        {
          name: "loop",
          label: "Loop",
          type: "select",
          required: true,
          options: [
            { value: "chilled_water", label: "Chilled water" },
            { value: "condenser_water", label: "Condenser water" },
          ],
        },
        { name: "designFlowLps", label: "Design flow", type: "number", measure: "flowLps", required: true },
        { name: "designHeadKPa", label: "Design head", type: "number", measure: "headKPa", required: true },
        ...nameplate,
      ];
    case "air_handler":
      return [
        { name: "designAirflowLps", label: "Design airflow", type: "number", measure: "airflowLps" },
        { name: "coilCapacityKW", label: "Cooling coil capacity", type: "number", measure: "capacityKW" },
        ...nameplate,
      ];
    case "weather_station":
      return nameplate;
  }
}

/** What the form holds: every value as typed, "" for empty. */
export type EquipmentFormValues = Record<string, string>;

/**
 * An empty add form: every field of every kind named, since a reset that names only some keeps the
 * rest, and the fields the kinds share (nameplate, serves) would carry into the next equipment.
 */
export function emptyEquipmentForm(system: UnitSystem): EquipmentFormValues {
  const names = equipmentKinds.flatMap((k) => equipmentFields(k, system).map((f) => f.name));
  return Object.fromEntries(["tag", "name", ...names].map((n) => [n, ""]));
}

/**
 * The typed values as the API's body (canonical units). Empty fields are left out, or sent as
 * null with `clearEmpty` (an edit clears a field that way).
 */
export function formToBody(
  kind: EquipmentKindName,
  values: EquipmentFormValues,
  system: UnitSystem,
  opts: { clearEmpty?: boolean } = {},
): Record<string, unknown> {
  const body: Record<string, unknown> = { kind, tag: values.tag?.trim() ?? "", name: values.name?.trim() ?? "" };
  for (const f of equipmentFields(kind, system)) {
    const raw = (values[f.name] ?? "").trim();
    if (f.type === "serves") {
      body.serves = raw === "" ? null : raw;
      continue;
    }
    if (raw === "") {
      if (opts.clearEmpty) body[f.name] = null;
      continue;
    }
    if (f.type === "number") {
      const n = Number(raw);
      // A non-number goes through as typed, so the schema names the field.
      body[f.name] = Number.isFinite(n) ? recordFromDisplay(n, f.measure, system) : raw;
    } else body[f.name] = raw;
  }
  // Only a variable-speed fan has a low speed limit.
  if (kind === "cooling_tower" && body.fanDrive === "single_speed")
    body.fanMinSpeedPct = opts.clearEmpty ? null : undefined;
  return body;
}

/** A stored record as the form's typed values. */
export function recordToForm(
  kind: EquipmentKindName,
  stored: { tag: string; name: string; serves: string | null; record: Record<string, unknown> },
  system: UnitSystem,
): EquipmentFormValues {
  const values: EquipmentFormValues = { tag: stored.tag, name: stored.name, serves: stored.serves ?? "" };
  const record = { ...stored.record };
  // A chiller is stored in tons; an SI form asks for kW.
  if (kind === "chiller" && typeof record.capacityTons === "number") record.capacityKW = record.capacityTons;
  for (const f of equipmentFields(kind, system)) {
    if (f.type === "serves") continue;
    const v = record[f.name];
    if (v === null || v === undefined) values[f.name] = "";
    else if (f.type === "number" && typeof v === "number") {
      // capacityKW on an SI chiller form shows the stored tons as kW.
      const measure = kind === "chiller" && f.name === "capacityKW" ? "capacityTons" : f.measure;
      values[f.name] = String(recordToDisplay(v, measure, system));
    } else values[f.name] = String(v);
  }
  return values;
}

export function fieldUnit(f: EquipmentField, system: UnitSystem): string {
  return f.type === "number" ? recordUnitLabel(f.measure, system) : "";
}
