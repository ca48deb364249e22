// What a scenario is: weather and building demand over time, the plant's starting setup, and a script of timed events.
import type { SiteLayout } from "../layout";
import type { InitialConditions } from "../plant";
import type { PlantCommand } from "../state";

export interface ScenarioConditions {
  dryBulbC: number;
  rhPct: number;
  loadFraction: number;
  ahusScheduled: number;
  coilAirC: number;
}

export interface ScriptedEvent {
  atS: number;
  command: PlantCommand;
}

export interface Scenario {
  name: string;
  title: string;
  description: string;
  defaultDurationS: number;
  /** Model step and reading interval the CLI uses unless told otherwise (long scenarios). */
  defaultStepS?: number;
  defaultSampleS?: number;
  /** Local clock hour at scenario time 0 (drives the weather and occupancy profiles). */
  startHour: number;
  initial(layout: SiteLayout): InitialConditions;
  conditions(tS: number, layout: SiteLayout): ScenarioConditions;
  script(layout: SiteLayout): ScriptedEvent[];
}
