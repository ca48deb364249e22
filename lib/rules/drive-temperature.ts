// Rule 6: compressor drive temperature rising toward its over-temperature trip, with the
// least-squares projected time to trip.

import { limitsOf } from "@/lib/plant/equipment-limits";
import { fitTrend, projectToValue } from "@/lib/plant/trend";
import { QUALIFIED_CAUTION, type Condition } from "./condition";
import { chillersOf, num, type RuleContext } from "./context";
import { formatDuration } from "@/lib/units";
import { fmtRate, fmtTemp } from "./format";
import { makeCondition } from "./make-condition";

export function driveTempTowardTrip(ctx: RuleContext): Condition[] {
  const s = ctx.settings.driveTemperature;
  if (!s.enabled) return [];
  return chillersOf(ctx.site).flatMap((chiller) => {
    const tempC = num(ctx, chiller.tag, "drive_temp");
    if (tempC === null) return [];
    const tripC = limitsOf(chiller).driveTempTripC;
    const fit = fitTrend(ctx.history.numbers(chiller.tag, "drive_temp", ctx.nowMs - s.fitWindowS * 1000, ctx.nowMs));
    const riseKPerMin = fit ? fit.slopePerS * 60 : null;
    const toTrip = fit && tempC < tripC ? projectToValue(fit, tripC) : null;
    const was = ctx.wasActive("drive_temp_toward_trip", chiller.tag);
    const slack = was ? s.deadBandK : 0;
    const rising = (riseKPerMin ?? 0) >= (was ? 0 : s.minRiseKPerMin);
    const near = tempC >= tripC - s.warnWithinK - slack;
    const soon = toTrip !== null && toTrip.timeS <= s.warnTimeToTripS && tempC >= s.watchAboveC - slack;
    const active = tempC >= tripC - slack || (rising && (near || soon));
    return [
      makeCondition({
        ruleId: "drive_temp_toward_trip",
        equipment: chiller.tag,
        active,
        priority: s.priority,
        atMs: ctx.nowMs,
        technicianMessage: active
          ? `${chiller.tag}: drive at ${fmtTemp(tempC)}, trip ${fmtTemp(tripC)}${riseKPerMin !== null ? `, rising ${fmtRate(riseKPerMin)}` : ""}${toTrip ? `; trip in about ${formatDuration(toTrip.timeS)}` : ""}.`
          : `${chiller.tag}: drive temperature ${fmtTemp(tempC)}.`,
        ownerMessage: active
          ? "The chiller's compressor drive is heating up and may shut the chiller down."
          : "Compressor drive temperature is normal.",
        advice: active
          ? [
              "Reduce compressor load.",
              "Check drive cooling: refrigerant or water cooling of the drive, and whether the loops are crossed.",
            ]
          : [],
        caution: active ? QUALIFIED_CAUTION : null,
        numbers: {
          driveTempC: tempC,
          tripC,
          riseKPerMin,
          timeToTripS: toTrip?.timeS ?? null,
          timeToTripEarliestS: toTrip?.earliestS ?? null,
        },
      }),
    ];
  });
}
