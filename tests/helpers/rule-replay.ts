// Runs a simulator scenario headless through a site's rule monitor on event time, and measures
// what a technician would see: when each alarm was raised, how long before the loops crossed,
// and the first advice of the crossover warning. Shared by the scenario tests and the lead report.
import { equipmentOf, getScenario, runScenario, siteLayouts, type SiteLayout } from "@/simulator";
import type { Site } from "@/lib/plant";
import { createSiteMonitor, defaultRuleSettings, type Condition, type RuleSettings } from "@/lib/rules";
import type { TransitionRecord } from "@/lib/alarms";
import { limitsOf } from "@/lib/plant/equipment-limits";
import { chillerParamsOf } from "@/simulator/params";

export const REPLAY_START_MS = Date.UTC(2025, 6, 1, 14, 0, 0);

/**
 * The rules' view of a simulated site, as the demo's equipment records give it: chillers with capacity,
 * refrigerant, design flows and barrel pressure drops; pumps serving their chiller on their loop.
 */
export function siteOfLayout(layout: SiteLayout): Site {
  const params = chillerParamsOf(layout);
  return equipmentOf(layout).map((e) => {
    const i = layout.chillers.findIndex((c) => c.tag === e.tag);
    if (i >= 0) {
      const { capacityTons, refrigerant } = layout.chillers[i];
      const p = params[i];
      return {
        tag: e.tag,
        kind: e.kind,
        capacityTons,
        refrigerant,
        designFlowLps: p.chwDesignLps,
        cwDesignFlowLps: p.cwDesignLps,
        evapDesignDpKPa: p.evapDpDesignKPa,
        condDesignDpKPa: p.condDpDesignKPa,
      };
    }
    // Pumps are dedicated: CHWP-n and CWP-n serve CH-n.
    const pump = /^C(H)?WP-(\d+)$/.exec(e.tag);
    if (pump)
      return {
        tag: e.tag,
        kind: e.kind,
        serves: `CH-${pump[2]}`,
        loop: pump[1] ? ("chilled_water" as const) : ("condenser_water" as const),
      };
    return { tag: e.tag, kind: e.kind };
  });
}

export interface ChillerReplay {
  /** First event time, while enabled, the chiller's condenser water entering was at or below its chilled water entering. */
  crossedAtMs: number | null;
  /** The condition of a rule the first time its alarm was raised, by rule id. */
  firstRaised: Map<string, { atMs: number; condition: Condition | undefined }>;
  /**
   * Evaluations at which a priority-1 alarm of this chiller was active while it ran with its condenser −
   * evaporator pressure difference at or above its record's minimum (for "no critical while running above it").
   */
  criticalWhileRunning: number;
}

export interface Replay {
  scenario: string;
  layout: string;
  transitions: TransitionRecord[];
  chillers: Map<string, ChillerReplay>;
  wallMs: number;
  durationS: number;
}

export function replay(
  scenario: string,
  opts: { layout?: string; durationS?: number; seed?: number; settings?: RuleSettings; site?: Site } = {},
): Replay {
  const layout = siteLayouts[opts.layout ?? "default"];
  const site = opts.site ?? siteOfLayout(layout);
  const durationS = opts.durationS ?? getScenario(scenario).defaultDurationS;
  const wall0 = performance.now();
  const monitor = createSiteMonitor({ site, settings: opts.settings ?? defaultRuleSettings });
  const transitions: TransitionRecord[] = [];
  const water = new Map<
    string,
    { cw?: number; chw?: number; running?: boolean; enabled?: boolean; condKPa?: number; evapKPa?: number }
  >();
  const chillers = new Map<string, ChillerReplay>();
  for (const c of layout.chillers)
    chillers.set(c.tag, { crossedAtMs: null, firstRaised: new Map(), criticalWhileRunning: 0 });
  for (const sample of runScenario({
    scenario,
    seed: opts.seed ?? 1,
    startMs: REPLAY_START_MS,
    durationS,
    sampleEveryS: 10,
    layout,
  })) {
    for (const r of sample.readings) {
      if (!chillers.has(r.equipment)) continue;
      const w = water.get(r.equipment) ?? {};
      if (r.quantity === "condenser_water_entering_temp") w.cw = r.value as number;
      if (r.quantity === "chilled_water_entering_temp") w.chw = r.value as number;
      if (r.quantity === "run_status") w.running = r.value as boolean;
      if (r.quantity === "run_enable_command") w.enabled = r.value as boolean;
      if (r.quantity === "condenser_refrigerant_pressure") w.condKPa = r.value as number;
      if (r.quantity === "evaporator_refrigerant_pressure") w.evapKPa = r.value as number;
      water.set(r.equipment, w);
    }
    for (const [tag, w] of water) {
      const c = chillers.get(tag)!;
      // A chiller the plant has not enabled (standby) sits in whatever water is around it: not a crossover.
      if (
        c.crossedAtMs === null &&
        w.enabled !== false &&
        w.cw !== undefined &&
        w.chw !== undefined &&
        w.cw - w.chw <= 0
      )
        c.crossedAtMs = sample.tsMs;
    }
    monitor.ingest(sample.readings);
    const ev = monitor.evaluate(sample.tsMs);
    for (const t of ev.transitions) {
      transitions.push(t);
      if (t.cause !== "condition_active" || t.to !== "unacknowledged") continue;
      const c = chillers.get(t.equipment);
      if (c && !c.firstRaised.has(t.ruleId))
        c.firstRaised.set(t.ruleId, {
          atMs: t.atMs,
          condition: ev.conditions.find((x) => x.ruleId === t.ruleId && x.equipment === t.equipment),
        });
    }
    for (const cond of ev.conditions) {
      const c = chillers.get(cond.equipment);
      if (!c) continue;
      const w = water.get(cond.equipment);
      const minKPa = limitsOf(site.find((e) => e.tag === cond.equipment)!).minStartLiftKPa;
      const aboveMin = w?.condKPa !== undefined && w.evapKPa !== undefined ? w.condKPa - w.evapKPa >= minKPa : true;
      if (cond.active && cond.priority === 1 && w?.running === true && aboveMin) c.criticalWhileRunning++;
    }
  }
  return {
    scenario,
    layout: layout.site,
    transitions,
    chillers,
    wallMs: performance.now() - wall0,
    durationS,
  };
}

/** Alarms raised (condition became active and the alarm went unacknowledged), optionally of one key. */
export const raised = (r: Replay, key?: string): TransitionRecord[] =>
  r.transitions.filter(
    (t) => t.cause === "condition_active" && t.to === "unacknowledged" && (key === undefined || t.alarmKey === key),
  );

/** Minutes the first crossover warning came before the loops crossed (null: no crossing or no warning before it). */
export function crossoverLeadMin(r: Replay, tag: string): number | null {
  const c = r.chillers.get(tag);
  if (!c || c.crossedAtMs === null) return null;
  const first = raised(r, `crossover_risk:${tag}`).find((t) => t.atMs <= c.crossedAtMs!);
  return first ? (c.crossedAtMs - first.atMs) / 60_000 : null;
}
