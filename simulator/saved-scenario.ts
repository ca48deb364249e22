// A simulator starting point saved from a site's stored readings at one moment (a real incident's
// conditions): the weather, which chillers ran, the fan drive's mode, the chilled-water setpoint and how
// many air handlers ran, replayed under a built-in scenario's script (the blip, the pump trip…).
// What the model can take from readings is limited; `approximated` lists what is not carried over.
import { z } from "zod";
import { fanDriveModes } from "@/lib/quantities";
import { getScenario, type Scenario } from "./scenarios";
import { coilAirC } from "./scenarios/profiles";
import type { SiteLayout } from "./layout";

export const savedScenarioDefinitionSchema = z.object({
  base: z.string(),
  layout: z.string(),
  atMs: z.number(),
  conditions: z.object({
    dryBulbC: z.number(),
    rhPct: z.number().min(0).max(100),
    ahusRunning: z.number().int().min(0),
  }),
  initial: z.object({
    disabledChillers: z.array(z.string()),
    fanMode: z.enum(fanDriveModes),
    chwSetpointC: z.number().optional(),
  }),
  approximated: z.array(z.string()),
});
export type SavedScenarioDefinition = z.infer<typeof savedScenarioDefinitionSchema>;

export interface StoredReading {
  equipment: string;
  quantity: string;
  value: number | boolean | string;
}

/** Reads the starting point from the latest stored value of each point at the moment (canonical SI). */
export function savedScenarioDefinition(
  base: string,
  layoutName: string,
  layout: SiteLayout,
  atMs: number,
  readings: readonly StoredReading[],
): SavedScenarioDefinition {
  const baseScenario = getScenario(base);
  const at0 = baseScenario.conditions(0, layout);
  const value = (equipment: string, quantity: string) =>
    readings.find((r) => r.equipment === equipment && r.quantity === quantity)?.value;
  const approximated: string[] = [
    "Weather is held at the saved moment's outdoor temperature and humidity for the whole drill.",
    "Water and refrigerant temperatures are not carried over: the model settles to steady operation at these conditions first.",
    "Building load is the base scenario's, scaled by the share of air handlers running.",
    "Anti-recycle timer settings, elapsed timers, latched alarms and refrigerant migration start fresh.",
  ];
  const num = (v: unknown) => (typeof v === "number" && Number.isFinite(v) ? v : undefined);
  const dryBulbC = num(value("WS-1", "outdoor_air_temp"));
  const rhPct = num(value("WS-1", "outdoor_air_humidity"));
  if (dryBulbC === undefined || rhPct === undefined)
    approximated.push("No outdoor readings at that moment: the base scenario's weather at its start is used.");
  const ahus = Array.from({ length: layout.airHandlers }, (_, i) => value(`AHU-${i + 1}`, "run_status"));
  const ahusKnown = ahus.some((v) => typeof v === "boolean");
  const ahusRunning = ahusKnown ? ahus.filter((v) => v === true).length : at0.ahusScheduled;
  if (!ahusKnown) approximated.push("No air-handler run status: the base scenario's schedule is used.");
  // A chiller that neither ran nor was enabled then is out of service in the drill; the lead runs regardless.
  const disabledChillers = layout.chillers
    .map((c) => c.tag)
    .filter((tag, i) => i > 0 && value(tag, "run_status") !== true && value(tag, "run_enable_command") !== true);
  const mode = value("CT-1", "fan_drive_mode");
  const fanMode = (fanDriveModes as readonly unknown[]).includes(mode)
    ? (mode as (typeof fanDriveModes)[number])
    : "auto";
  const chwSetpointC = num(value(layout.chillers[0].tag, "chilled_water_leaving_temp_setpoint"));
  return {
    base,
    layout: layoutName,
    atMs,
    conditions: { dryBulbC: dryBulbC ?? at0.dryBulbC, rhPct: rhPct ?? at0.rhPct, ahusRunning },
    initial: { disabledChillers, fanMode, ...(chwSetpointC !== undefined ? { chwSetpointC } : {}) },
    approximated,
  };
}

/** The scenario a saved starting point runs as: its conditions held, the base scenario's script on top. */
export function scenarioOfSaved(id: string, title: string, def: SavedScenarioDefinition): Scenario {
  const base = getScenario(def.base);
  return {
    ...base,
    name: `saved:${id}`,
    title,
    description: `${title}: saved conditions under the ${base.title.toLowerCase()} script.`,
    initial: () => def.initial,
    conditions(tS, layout) {
      const b = base.conditions(tS, layout);
      const share = layout.airHandlers > 0 ? def.conditions.ahusRunning / layout.airHandlers : 1;
      return {
        dryBulbC: def.conditions.dryBulbC,
        rhPct: def.conditions.rhPct,
        loadFraction: b.loadFraction * share,
        ahusScheduled: Math.min(layout.airHandlers, def.conditions.ahusRunning),
        coilAirC: coilAirC(def.conditions.dryBulbC),
      };
    },
  };
}
