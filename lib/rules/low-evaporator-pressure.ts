// Low evaporator pressure (freeze risk), expressed as saturated evaporating temperature.
// Suppressed by design while the chiller is off and for a grace period after a start, when
// evaporator pressure normally dips (ISA-18.2 design suppression).

import { lastEdgeMs } from "./history";
import type { Condition } from "./condition";
import { bool, chillersOf, num, type RuleContext } from "./context";
import { fmtTemp } from "./format";
import { makeCondition } from "./make-condition";

export function lowEvaporatorPressure(ctx: RuleContext): Condition[] {
  const s = ctx.settings.lowEvaporatorPressure;
  if (!s.enabled) return [];
  return chillersOf(ctx.site).flatMap((chiller) => {
    const satC = num(ctx, chiller.tag, "evaporator_saturated_temp");
    if (satC === null) return [];
    const was = ctx.wasActive("low_evaporator_pressure", chiller.tag);
    const active = satC <= s.limitC + (was ? s.deadBandK : 0);
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
          ? `${chiller.tag}: saturated evaporating temperature ${fmtTemp(satC)}, at or below the ${fmtTemp(s.limitC)} freeze-risk limit.`
          : `${chiller.tag}: evaporator pressure normal.`,
        ownerMessage: active
          ? "A chiller is running colder than is safe for its water tubes."
          : "Chiller evaporator pressure is normal.",
        advice: active ? ["Check chilled-water flow and the leaving-water setpoint.", "Check refrigerant charge."] : [],
        numbers: { evaporatorSaturatedC: satC, limitC: s.limitC },
      }),
    ];
  });
}
