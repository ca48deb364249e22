// Ties history, rules, on/off delays and the alarm book together for one site. Everything
// runs on event time: feed readings in time order, call `evaluate(nowMs)` as often as wanted
// (each gateway message, or every few seconds of event time), store the transitions.

import { applyConditions, emptyAlarmBook, type AlarmBook } from "@/lib/alarms/book";
import { stepDelay, type DelayState } from "@/lib/alarms/delay";
import type { TransitionRecord } from "@/lib/alarms/state-machine";
import type { Reading, Site } from "@/lib/plant/site";
import type { SiteSnapshot } from "@/lib/plant/snapshot";
import { ruleIds, type Condition } from "./condition";
import type { CommStatus } from "./context";
import { evaluateRules } from "./evaluate";
import { ReadingHistory } from "./history";
import { defaultRuleSettings, type RuleSettings } from "./settings";

const ruleSettingKey: Record<Condition["ruleId"], keyof RuleSettings> = {
  crossover_risk: "crossoverRisk",
  restart_race: "restartRace",
  loops_crossed: "loopsCrossed",
  tower_fan_not_running: "towerFan",
  head_pressure_near_trip: "headPressure",
  drive_temp_toward_trip: "driveTemperature",
  power_event_suspected: "powerEvent",
  chiller_tripped: "chillerTrip",
  comm_lost: "commLost",
  efficiency_drift: "efficiencyDrift",
  low_evaporator_pressure: "lowEvaporatorPressure",
  tower_fan_not_in_auto: "towerFanMode",
  starts_per_hour: "startsPerHour",
  pump_not_proven: "pumpProof",
  barrel_flow_lost: "barrelFlow",
  chilled_water_not_made: "chilledWaterNotMade",
  sensor_implausible: "sensorPlausibility",
};

export function delaysFor(
  settings: RuleSettings,
  ruleId: Condition["ruleId"],
): { onDelayS: number; offDelayS: number } {
  const s = settings[ruleSettingKey[ruleId]] as { onDelayS?: number; offDelayS?: number };
  return { onDelayS: s.onDelayS ?? 0, offDelayS: s.offDelayS ?? 0 };
}

export interface SiteEvaluation {
  atMs: number;
  /** Conditions after on/off delays: `active` is what the alarm follows; `rawActive` what the rule saw. */
  conditions: (Condition & { rawActive: boolean })[];
  transitions: TransitionRecord[];
  alarms: AlarmBook;
  snapshot: SiteSnapshot;
}

export interface SiteMonitor {
  readonly history: ReadingHistory;
  ingest(readings: Iterable<Reading>): void;
  evaluate(nowMs: number, comms?: CommStatus): SiteEvaluation;
  /** The alarm book, for commands (acknowledge, shelve…) — then hand the new book back with `setAlarms`. */
  alarms(): AlarmBook;
  setAlarms(book: AlarmBook): void;
}

export function createSiteMonitor(args: {
  site: Site;
  settings?: RuleSettings;
  retentionS?: number;
  alarms?: AlarmBook;
  timeZone?: string;
  /** The readings of a monitor this one replaces (new limits or settings), so no history is lost. */
  history?: ReadingHistory;
}): SiteMonitor {
  const settings = args.settings ?? defaultRuleSettings;
  // The longest look back any rule (or the site page's 1 h margin trend) takes, plus slack: a
  // portfolio holds this much of every point in memory (2 h had been ~2.3 GB for 100,000 points).
  const lookBackS = Math.max(
    3600,
    settings.crossoverRisk.fitWindowS,
    settings.crossoverRisk.slowFitWindowS,
    settings.towerFan.riseWindowS,
    settings.headPressure.riseWindowS,
    settings.driveTemperature.fitWindowS,
    settings.powerEvent.windowS + settings.powerEvent.holdS,
    settings.efficiencyDrift.averagingWindowS,
  );
  const history = args.history ?? new ReadingHistory(args.retentionS ?? lookBackS + 600);
  let previous: Condition[] = [];
  // By rule, then equipment: no key string to build per condition and evaluation.
  const delays = new Map<Condition["ruleId"], Map<string, DelayState>>();
  const delaySettings = new Map(ruleIds.map((id) => [id, delaysFor(settings, id)]));
  let book: AlarmBook = args.alarms ?? emptyAlarmBook();

  return {
    history,
    ingest: (readings) => history.addAll(readings),
    evaluate(nowMs, comms) {
      const { conditions, snapshot } = evaluateRules({
        site: args.site,
        history,
        settings,
        nowMs,
        comms,
        previous,
        timeZone: args.timeZone,
      });
      // Only the active ones are read back (dead bands); holding every condition until the next
      // evaluation would keep it alive through young-generation collections.
      // Copies, as the rules saw them: the loop below sets `active` to the delayed state.
      previous = conditions.filter((c) => c.active).map((c) => ({ ...c }));
      // The conditions are this evaluation's own objects: they take the delayed state in place
      // rather than as copies (a site's ~100 conditions every 5 s, most of them unchanged).
      const delayed = conditions as (Condition & { rawActive: boolean })[];
      for (const c of delayed) {
        let byTag = delays.get(c.ruleId);
        if (!byTag) delays.set(c.ruleId, (byTag = new Map()));
        const step = stepDelay(byTag.get(c.equipment), c.active, nowMs, delaySettings.get(c.ruleId)!);
        byTag.set(c.equipment, step);
        c.rawActive = c.active;
        c.active = step.active;
      }
      const applied = applyConditions(book, delayed, nowMs);
      book = applied.book;
      return { atMs: nowMs, conditions: delayed, transitions: applied.transitions, alarms: book, snapshot };
    },
    alarms: () => book,
    setAlarms: (b) => {
      book = b;
    },
  };
}
