import type { Equipment } from "@/lib/plant/site";
import type { QuantityKey } from "@/lib/quantities";
import type { RuleSettings } from "@/lib/rules/settings";

/** One point's stored readings in a replay window, as columns (canonical SI; booleans as booleans). */
export interface ReplayPointDto {
  pointId: number;
  equipment: string;
  quantity: QuantityKey;
  tsMs: number[];
  values: (number | boolean | string)[];
}

/** One recorded alarm transition, in event time. */
export interface ReplayTransitionDto {
  alarmKey: string;
  ruleId: string;
  equipment: string;
  priority: number;
  from: string;
  to: string;
  cause: string;
  atMs: number;
  /** When the server stored it (wall clock). */
  wallAtMs: number;
}

/** A window of a site to replay: its equipment, its readings and its recorded alarm transitions. */
export interface ReplayWindowDto {
  siteId: string;
  timeZone: string | null;
  fromMs: number;
  toMs: number;
  /** The site's equipment as the plant numbers read it. */
  equipment: Equipment[];
  points: ReplayPointDto[];
  transitions: ReplayTransitionDto[];
  /** The site's crossover-fit settings, which the plant numbers (time to crossover) are drawn with. */
  crossoverRisk: RuleSettings["crossoverRisk"];
  /** Alarm transitions recorded before the window whose alarm was still out of normal at its start. */
  activeAtStart: ReplayTransitionDto[];
}
