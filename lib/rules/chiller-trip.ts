// Rule 8: chiller tripped / latched alarm, from the controller's own fault points.

import { QUALIFIED_CAUTION, type Condition } from "./condition";
import { bool, chillersOf, str, type RuleContext } from "./context";
import { makeCondition } from "./make-condition";

export function chillerTripped(ctx: RuleContext): Condition[] {
  const s = ctx.settings.chillerTrip;
  if (!s.enabled) return [];
  return chillersOf(ctx.site).flatMap((chiller) => {
    const latched = bool(ctx, chiller.tag, "chiller_alarm");
    const driveFault = bool(ctx, chiller.tag, "drive_fault");
    if (latched === null && driveFault === null) return [];
    const text = str(ctx, chiller.tag, "fault_text");
    const active = latched === true || driveFault === true;
    const what = latched ? "latched alarm" : "drive fault";
    return [
      makeCondition({
        ruleId: "chiller_tripped",
        equipment: chiller.tag,
        active,
        priority: s.priority,
        atMs: ctx.nowMs,
        latching: s.latching,
        technicianMessage: active
          ? `${chiller.tag} tripped: ${what}${text ? ` — "${text}"` : ""}.`
          : `${chiller.tag}: no controller alarm.`,
        ownerMessage: active
          ? "A chiller has shut itself down on a fault and needs a technician."
          : "No chiller faults.",
        advice: active
          ? [
              "Read the controller's fault log and find the cause before resetting.",
              "Watch the crossover margin while the chiller is off.",
            ]
          : [],
        caution: active ? QUALIFIED_CAUTION : null,
        numbers: {
          latchedAlarm: latched === null ? null : Number(latched),
          driveFault: driveFault === null ? null : Number(driveFault),
        },
        related: text ? [text] : [],
      }),
    ];
  });
}
