// Short cycling: compressor starts in the last hour against the chiller record's limit
// (`maxStartsPerHour`). Each start heats the motor windings; at the limit the controller holds the
// next start, which is when a restart race is lost.

import { limitsOf } from "@/lib/plant/equipment-limits";
import type { Condition } from "./condition";
import { chillersOf, type RuleContext } from "./context";
import { makeCondition } from "./make-condition";

export function startsPerHour(ctx: RuleContext): Condition[] {
  const s = ctx.settings.startsPerHour;
  if (!s.enabled) return [];
  return chillersOf(ctx.site).flatMap((chiller) => {
    const rises = ctx.history.edges(chiller.tag, "run_status", ctx.nowMs).rises;
    const starts = rises.filter((t) => t > ctx.nowMs - 3600_000).length;
    const limit = limitsOf(chiller).maxStartsPerHour;
    // Once raised, it clears one start under the limit (dead band of one start).
    const active = starts >= limit - (ctx.wasActive("starts_per_hour", chiller.tag) ? 1 : 0);
    return [
      makeCondition({
        ruleId: "starts_per_hour",
        equipment: chiller.tag,
        active,
        priority: s.priority,
        atMs: ctx.nowMs,
        technicianMessage: active
          ? `${chiller.tag}: ${starts} compressor starts in the last hour, at its limit of ${limit} — short cycling; the controller will hold the next start.`
          : `${chiller.tag}: ${starts} start${starts === 1 ? "" : "s"} in the last hour (limit ${limit}).`,
        ownerMessage: active
          ? "A chiller is starting and stopping too often, which wears its motor and can delay a restart."
          : "Chiller starts are within limits.",
        advice: active
          ? [
              "Find why it cycles: load below the chiller's minimum (stage fewer chillers, widen the restart differential within the manufacturer's limits), a safety that resets itself, or a chilled-water setpoint fighting another controller.",
            ]
          : [],
        caution: active
          ? "Start limits protect the motor: do not shorten anti-recycle timers to get more starts; change control settings only within the manufacturer's limits."
          : null,
        numbers: { startsLastHour: starts, maxStartsPerHour: limit },
      }),
    ];
  });
}
