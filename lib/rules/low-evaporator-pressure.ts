// Low evaporator pressure (freeze risk), expressed as saturated evaporating temperature (read, or
// derived from the evaporator pressure and the chiller's refrigerant when the site has no such point).
// Warns at a fixed limit and, with real lead, on the projected time to the chiller record's cut-out.
// Suppressed by design while the chiller is off and for a grace period after a start, when
// evaporator pressure normally dips (ISA-18.2 design suppression).

import { asRefrigerant, limitsOf } from "@/lib/plant/equipment-limits";
import { fitTrend, projectToValue, type TimedValue } from "@/lib/plant/trend";
import { formatDuration } from "@/lib/units";
import { cachedSaturationTempC } from "./saturation";
import { lastEdgeMs } from "./history";
import type { Condition } from "./condition";
import { bool, chillersOf, num, type RuleContext } from "./context";
import { fmtRate, fmtTemp } from "./format";
import { makeCondition } from "./make-condition";

export function lowEvaporatorPressure(ctx: RuleContext): Condition[] {
  const s = ctx.settings.lowEvaporatorPressure;
  if (!s.enabled) return [];
  return chillersOf(ctx.site).flatMap((chiller) => {
    const fromMs = ctx.nowMs - s.fitWindowS * 1000;
    let satC = num(ctx, chiller.tag, "evaporator_saturated_temp");
    let series: TimedValue[] = ctx.history.numbers(chiller.tag, "evaporator_saturated_temp", fromMs, ctx.nowMs);
    if (satC === null) {
      const kPa = num(ctx, chiller.tag, "evaporator_refrigerant_pressure");
      if (kPa === null) return [];
      const sat = cachedSaturationTempC(asRefrigerant(chiller.refrigerant) ?? "R-134a");
      satC = sat(kPa);
      series = ctx.history
        .numbers(chiller.tag, "evaporator_refrigerant_pressure", fromMs, ctx.nowMs)
        .map((p) => ({ tsMs: p.tsMs, value: sat(p.value) }));
    }
    const cutoutC = limitsOf(chiller).lowEvapTempCutoutC;
    const was = ctx.wasActive("low_evaporator_pressure", chiller.tag);
    const fit = fitTrend(series);
    const fallKPerMin = fit ? -fit.slopePerS * 60 : null;
    const toTrip = fit && satC > cutoutC ? projectToValue(fit, cutoutC) : null;
    const watched = satC <= cutoutC + s.watchWithinK + (was ? s.deadBandK : 0);
    const falling = (fallKPerMin ?? 0) >= (was ? 0 : s.minFallKPerMin);
    const soon = watched && falling && toTrip !== null && toTrip.timeS <= s.warnTimeToTripS;
    const active = soon || satC <= s.limitC + (was ? s.deadBandK : 0);
    const running = bool(ctx, chiller.tag, "run_status") === true;
    const startMs = lastEdgeMs(ctx.history.edges(chiller.tag, "run_status", ctx.nowMs).rises);
    const starting = running && startMs !== null && ctx.nowMs - startMs < s.startupGraceS * 1000;
    const suppressedReason = !running ? "chiller off" : starting ? "chiller starting" : null;
    return [
      makeCondition({
        ruleId: "low_evaporator_pressure",
        equipment: chiller.tag,
        active,
        priority: s.priority,
        atMs: ctx.nowMs,
        suppressedReason,
        technicianMessage: active
          ? `${chiller.tag}: saturated evaporating temperature ${fmtTemp(satC)}${soon && toTrip ? `, falling ${fmtRate(fallKPerMin!)}; its ${fmtTemp(cutoutC)} cut-out in about ${formatDuration(toTrip.timeS)}` : `, at or below the ${fmtTemp(s.limitC)} freeze-risk limit`}.`
          : `${chiller.tag}: evaporator pressure normal.`,
        ownerMessage: active
          ? "A chiller is running colder than is safe for its water tubes."
          : "Chiller evaporator pressure is normal.",
        advice: active ? ["Check chilled-water flow and the leaving-water setpoint.", "Check refrigerant charge."] : [],
        numbers: {
          evaporatorSaturatedC: satC,
          limitC: s.limitC,
          cutoutC,
          fallKPerMin,
          timeToTripS: toTrip?.timeS ?? null,
        },
      }),
    ];
  });
}
