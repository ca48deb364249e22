// Rule 5: condensing pressure heading for the high-pressure cut-out. The cut-out is the chiller's
// own, from its equipment record (entered, else the refrigerant's default); the warning is on the
// projected time to reach it from the trend, because a fixed band below the trip is only minutes
// at the rates a lost tower fan gives.

import { limitsOf } from "@/lib/plant/equipment-limits";
import { fitTrend, projectToValue } from "@/lib/plant/trend";
import type { Condition } from "./condition";
import { bool, chillersOf, num, type RuleContext } from "./context";
import { lastEdgeMs } from "./history";
import { formatDuration } from "@/lib/units";
import { fmtPressure, fmtPressureRate } from "./format";
import { makeCondition } from "./make-condition";

export const HAND_RESET_CAUTION =
  "A mechanical high-pressure cut-out is often reset by hand at the device: after a trip, recovery may need someone on site. Follow the manufacturer's procedures, local codes and licensed practice.";

export function headPressureNearTrip(ctx: RuleContext): Condition[] {
  const s = ctx.settings.headPressure;
  if (!s.enabled) return [];
  return chillersOf(ctx.site).flatMap((chiller) => {
    const pKPa = num(ctx, chiller.tag, "condenser_refrigerant_pressure");
    if (pKPa === null) return [];
    const tripKPa = limitsOf(chiller).highCondPressureCutoutKPa;
    const running = bool(ctx, chiller.tag, "run_status") === true;
    const startMs = lastEdgeMs(ctx.history.edges(chiller.tag, "run_status", ctx.nowMs).rises);
    const starting = running && startMs !== null && ctx.nowMs - startMs < s.startupGraceS * 1000;
    const fit = fitTrend(
      ctx.history.numbers(chiller.tag, "condenser_refrigerant_pressure", ctx.nowMs - s.riseWindowS * 1000, ctx.nowMs),
    );
    const riseKPaPerMin = fit ? fit.slopePerS * 60 : null;
    const was = ctx.wasActive("head_pressure_near_trip", chiller.tag);
    const slackKPa = was ? s.deadBandKPa : 0;
    const toTrip = fit && pKPa < tripKPa ? projectToValue(fit, tripKPa) : null;
    // Once raised it returns to normal only when clearly so (ISA-18.2 dead band): back out of the watch
    // band, or falling at the rise rate. A controller holding or unloading near its cut-out keeps the
    // pressure at the projection's edge — still at its limit, and a warning that cleared and returned
    // there would chatter.
    const rising = (riseKPaPerMin ?? 0) >= s.minRiseKPaPerMin;
    const falling = (riseKPaPerMin ?? 0) <= -s.minRiseKPaPerMin;
    const watched = pKPa >= tripKPa - s.watchWithinKPa - slackKPa && !starting;
    const soon = watched && (was ? !falling : rising && toTrip !== null && toTrip.timeS <= s.warnTimeToTripS);
    const atLimit = pKPa >= tripKPa - s.warnWithinKPa - slackKPa;
    const active = running && (soon || atLimit);
    const rate = riseKPaPerMin !== null ? `, rising ${fmtPressureRate(riseKPaPerMin)}` : "";
    return [
      makeCondition({
        ruleId: "head_pressure_near_trip",
        equipment: chiller.tag,
        active,
        priority: s.priority,
        atMs: ctx.nowMs,
        technicianMessage: active
          ? `${chiller.tag}: condenser pressure ${fmtPressure(pKPa)}, ${fmtPressure(Math.max(0, tripKPa - pKPa), true)} below its ${fmtPressure(tripKPa)} cut-out${rate}${toTrip ? `; cut-out in about ${formatDuration(toTrip.timeS)}` : ""}.`
          : `${chiller.tag}: condenser pressure ${fmtPressure(pKPa)}.`,
        ownerMessage: active
          ? "The chiller is close to shutting itself down on high pressure."
          : "Chiller pressures are normal.",
        advice: active
          ? [
              "Check the tower fans and condenser-water flow and restore heat rejection — the pressure follows the condenser water.",
              "If heat rejection cannot be restored within minutes, reduce the chiller's load — a chiller that unloads keeps running, one that trips must wait out its timers.",
            ]
          : [],
        caution: active ? HAND_RESET_CAUTION : null,
        numbers: {
          condenserPressureKPa: pKPa,
          tripKPa,
          riseKPaPerMin,
          timeToTripS: toTrip?.timeS ?? null,
          timeToTripEarliestS: toTrip?.earliestS ?? null,
        },
      }),
    ];
  });
}
