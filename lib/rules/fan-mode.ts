// Tower fan drive out of auto while the plant runs: a drive left in off (a power blip can bring it
// back that way) or in hand (fixed speed, no control) is found before the water shows it, whatever
// the water temperature and whether or not the site reads a condenser-water setpoint.

import { towersServing } from "@/lib/plant/site";
import type { Condition } from "./condition";
import { bool, chillersOf, str, type RuleContext } from "./context";
import { FAN_LOCKOUT_CHECK } from "./advice";
import { makeCondition } from "./make-condition";

export function towerFanNotInAuto(ctx: RuleContext): Condition[] {
  const s = ctx.settings.towerFanMode;
  if (!s.enabled) return [];
  const running = chillersOf(ctx.site).filter((c) => bool(ctx, c.tag, "run_status") === true);
  return ctx.site
    .filter((e) => e.kind === "cooling_tower")
    .flatMap((tower) => {
      const mode = str(ctx, tower.tag, "fan_drive_mode");
      if (mode === null) return [];
      const serving = running.filter((c) => towersServing(ctx.site, c.tag).some((t) => t.tag === tower.tag));
      const active = (mode === "off" || mode === "hand") && serving.length > 0;
      const chillers = serving.map((c) => c.tag).join(", ");
      return [
        makeCondition({
          ruleId: "tower_fan_not_in_auto",
          equipment: tower.tag,
          active,
          priority: s.priority,
          atMs: ctx.nowMs,
          technicianMessage: active
            ? `${tower.tag}: fan drive in ${mode} while ${chillers} ${serving.length > 1 ? "run" : "runs"} — ${mode === "off" ? "no heat rejection when the condenser water rises" : "fixed speed, not following the condenser-water setpoint (over-cooling on a cool day, too little on a hot one)"}.`
            : `${tower.tag}: fan drive in ${mode}.`,
          ownerMessage: active
            ? "A cooling-tower fan has been left out of automatic control while the plant runs."
            : "Cooling-tower fans are under automatic control.",
          advice: active
            ? [
                FAN_LOCKOUT_CHECK,
                "When it is safe and the reason is known, return the drive to auto so the controls hold the condenser water at setpoint.",
              ]
            : [],
          caution: active
            ? "Work on tower fans and drives only under lockout/tagout by qualified people, following the manufacturer's procedures and local codes."
            : null,
          numbers: { driveInOff: Number(mode === "off"), driveInHand: Number(mode === "hand") },
        }),
      ];
    });
}
