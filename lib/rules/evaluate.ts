// Evaluates every rule for one site at one event time. Pure given the history view.

import { asRefrigerant, limitsOf } from "@/lib/plant/equipment-limits";
import { minStartMarginK } from "@/lib/plant/crossover";
import { saturationPressureKPa } from "@/lib/refrigerant";
import { cachedSaturationTempC } from "./saturation";
import { computeSiteSnapshot, type ChillerHistoryInputs, type SiteSnapshot } from "@/lib/plant/snapshot";
import type { Site } from "@/lib/plant/site";
import { chillerTripped } from "./chiller-trip";
import { commLost } from "./comm-lost";
import type { Condition, RuleId } from "./condition";
import { marginSeries, num, refrigerantMarginSeries, type CommStatus, type Rule, type RuleContext } from "./context";
import { crossoverRisk, loopsCrossed, restartRace } from "./crossover-rules";
import { driveTempTowardTrip } from "./drive-temperature";
import { efficiencyDrift } from "./efficiency-drift";
import { headPressureNearTrip } from "./head-pressure";
import { lastEdgeMs, type HistoryView } from "./history";
import { lowEvaporatorPressure } from "./low-evaporator-pressure";
import { powerEventSuspected } from "./power-event";
import type { RuleSettings } from "./settings";
import { towerFanNotRunning } from "./tower-fan";
import { towerFanNotInAuto } from "./fan-mode";
import { startsPerHour } from "./starts-per-hour";
import { pumpNotProven } from "./pump-proof";
import { barrelFlowLost } from "./barrel-flow";
import { chilledWaterNotMade } from "./chilled-water-not-made";
import { sensorFaults, sensorImplausible, suppressOnFailedSensors } from "./plausibility";

/** Every rule but sensor plausibility, which runs first and can suppress the others (see `evaluateRules`). */
export const rules: Record<Exclude<RuleId, "sensor_implausible">, Rule> = {
  crossover_risk: crossoverRisk,
  restart_race: restartRace,
  loops_crossed: loopsCrossed,
  tower_fan_not_running: towerFanNotRunning,
  head_pressure_near_trip: headPressureNearTrip,
  drive_temp_toward_trip: driveTempTowardTrip,
  power_event_suspected: powerEventSuspected,
  chiller_tripped: chillerTripped,
  comm_lost: commLost,
  efficiency_drift: efficiencyDrift,
  low_evaporator_pressure: lowEvaporatorPressure,
  tower_fan_not_in_auto: towerFanNotInAuto,
  starts_per_hour: startsPerHour,
  pump_not_proven: pumpNotProven,
  barrel_flow_lost: barrelFlowLost,
  chilled_water_not_made: chilledWaterNotMade,
};

/** The site's derived numbers at `nowMs`, including time to crossover and lockout from history. */
export function snapshotFromHistory(
  site: Site,
  history: HistoryView,
  settings: RuleSettings,
  nowMs: number,
): SiteSnapshot {
  const c = settings.crossoverRisk;
  const perChiller: Record<string, ChillerHistoryInputs> = {};
  const probe: RuleContext = {
    site,
    history,
    settings,
    nowMs,
    comms: {},
    snapshot: { atMs: nowMs, chillers: [], towers: [], wetBulbC: null },
    wasActive: () => false,
  };
  for (const chiller of site.filter((e) => e.kind === "chiller")) {
    const edges = history.edges(chiller.tag, "run_status", nowMs);
    const lastStartMs = lastEdgeMs(edges.rises);
    const lastStopMs = lastEdgeMs(edges.falls);
    // A start or stop changes how the loops move; fit only the margin since then.
    const lastChangeMs = Math.max(lastStartMs ?? -Infinity, lastStopMs ?? -Infinity);
    const settleS = lastStopMs !== null && lastStopMs === lastChangeMs ? c.stopSettleS : 0;
    const sinceChangeS = Math.max(0, (nowMs - lastChangeMs) / 1000 - settleS);
    // The shells' pressures read the crossover most directly (running: the lift; stopped: each
    // shell's saturation); the water margin stands in when the site has no such points.
    const refrigerant = asRefrigerant(chiller.refrigerant) ?? "R-134a";
    const satTempC = cachedSaturationTempC(refrigerant);
    const evapKPa = num(probe, chiller.tag, "evaporator_refrigerant_pressure");
    const condKPa = num(probe, chiller.tag, "condenser_refrigerant_pressure");
    const chwC = num(probe, chiller.tag, "chilled_water_entering_temp");
    const basis = evapKPa !== null && condKPa !== null ? "refrigerant" : "water";
    const baseKPa = evapKPa ?? (chwC !== null ? saturationPressureKPa(refrigerant, chwC) : null);
    const startMarginK = baseKPa !== null ? minStartMarginK(satTempC, baseKPa, limitsOf(chiller).minStartLiftKPa) : 0;
    // One walk over the longer window; the shorter one is its tail.
    const longS = Math.min(Math.max(c.fitWindowS, c.slowFitWindowS), sinceChangeS);
    const long = (
      basis === "refrigerant"
        ? refrigerantMarginSeries(probe, chiller, longS, satTempC)
        : marginSeries(probe, chiller, longS)
    ).map((p) => ({ tsMs: p.tsMs, value: p.value - startMarginK }));
    const tail = (windowS: number) => {
      const fromMs = nowMs - Math.min(windowS, sinceChangeS) * 1000;
      return long.filter((p) => p.tsMs >= fromMs);
    };
    perChiller[chiller.tag] = {
      marginSamples: tail(c.fitWindowS),
      slowMarginSamples: tail(c.slowFitWindowS),
      lastStartMs,
      lastStopMs,
      marginBasis: basis,
      startMarginK,
    };
  }
  return computeSiteSnapshot(site, history.latestValuesAt(nowMs), nowMs, {
    history: perChiller,
    timeToCrossover: {
      windowS: c.fitWindowS,
      minSamples: c.minSamples,
      minSpanS: c.minSpanS,
      minClosingRateKPerS: c.minClosingRateKPerMin / 60,
    },
    slowTimeToCrossover: {
      windowS: c.slowFitWindowS,
      minSamples: c.minSamples,
      minSpanS: c.slowMinSpanS,
      minClosingRateKPerS: c.slowMinClosingRateKPerMin / 60,
    },
    // The chiller record's timer settings (entered, else the common-practice defaults).
    fallbackTimers: limitsOf,
  });
}

export interface EvaluateArgs {
  site: Site;
  history: HistoryView;
  settings: RuleSettings;
  nowMs: number;
  comms?: CommStatus;
  /** The site's IANA time zone (clock times in messages). */
  timeZone?: string;
  /** Raw conditions of the previous evaluation, for dead bands; empty on the first. */
  previous?: readonly Condition[];
}

/** Raw conditions of every rule (before on/off delays), plus the snapshot they were drawn from. */
export function evaluateRules(args: EvaluateArgs): { conditions: Condition[]; snapshot: SiteSnapshot } {
  const snapshot = snapshotFromHistory(args.site, args.history, args.settings, args.nowMs);
  const prevActive = new Set((args.previous ?? []).filter((c) => c.active).map((c) => `${c.ruleId}:${c.equipment}`));
  const ctx: RuleContext = {
    site: args.site,
    history: args.history,
    settings: args.settings,
    nowMs: args.nowMs,
    snapshot,
    comms: args.comms ?? {},
    timeZone: args.timeZone,
    wasActive: (ruleId, tag) => prevActive.has(`${ruleId}:${tag}`),
  };
  const faults = sensorFaults(ctx);
  const conditions = suppressOnFailedSensors(
    ctx,
    Object.values(rules).flatMap((rule) => rule(ctx)),
    faults,
  );
  return { conditions: [...conditions, ...sensorImplausible(ctx, faults)], snapshot };
}
