// Rule 5: condensing pressure within a margin of the high-pressure trip and rising. The trip is
// the chiller's own high condenser pressure cut-out from its equipment record.

import { limitsOf } from "@/lib/plant/equipment-limits";
import { fitTrend, projectToValue } from "@/lib/plant/trend";
import type { Condition } from "./condition";
import { bool, chillersOf, num, type RuleContext } from "./context";
import { formatDuration } from "@/lib/units";
import { fmtPressure } from "./format";
import { makeCondition } from "./make-condition";

export function headPressureNearTrip(ctx: RuleContext): Condition[] {
  const s = ctx.settings.headPressure;
  if (!s.enabled) return [];
  return chillersOf(ctx.site).flatMap((chiller) => {
    const pKPa = num(ctx, chiller.tag, "condenser_refrigerant_pressure");
    if (pKPa === null) return [];
    const tripKPa = limitsOf(chiller).highCondPressureCutoutKPa;
    const running = bool(ctx, chiller.tag, "run_status") === true;
    const fit = fitTrend(
      ctx.history.numbers(chiller.tag, "condenser_refrigerant_pressure", ctx.nowMs - s.riseWindowS * 1000, ctx.nowMs),
    );
    const riseKPaPerMin = fit ? fit.slopePerS * 60 : null;
    const was = ctx.wasActive("head_pressure_near_trip", chiller.tag);
    const near = pKPa >= tripKPa - s.warnWithinKPa - (was ? s.deadBandKPa : 0);
    const rising = was ? (riseKPaPerMin ?? 0) > -s.minRiseKPaPerMin : (riseKPaPerMin ?? 0) >= s.minRiseKPaPerMin;
    const active = running && near && rising;
    const toTrip = fit ? projectToValue(fit, tripKPa) : null;
    return [
      makeCondition({
        ruleId: "head_pressure_near_trip",
        equipment: chiller.tag,
        active,
        priority: s.priority,
        atMs: ctx.nowMs,
        technicianMessage: active
          ? `${chiller.tag}: condenser pressure ${fmtPressure(pKPa)}, ${(tripKPa - pKPa).toFixed(0)} kPa below the ${fmtPressure(tripKPa)} trip and rising ${riseKPaPerMin!.toFixed(1)} kPa/min${toTrip ? `; trip in about ${formatDuration(toTrip.timeS)}` : ""}.`
          : `${chiller.tag}: condenser pressure ${fmtPressure(pKPa)}.`,
        ownerMessage: active
          ? "The chiller is close to shutting itself down on high pressure."
          : "Chiller pressures are normal.",
        advice: active
          ? [
              "Check tower fans and condenser-water flow; restore heat rejection.",
              "Reduce chiller load if heat rejection cannot be restored quickly.",
            ]
          : [],
        numbers: { condenserPressureKPa: pKPa, tripKPa, riseKPaPerMin, timeToTripS: toTrip?.timeS ?? null },
      }),
    ];
  });
}
