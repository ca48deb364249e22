// Rule 4: tower fan not running when needed. After a power blip a fan drive can come back
// in "off"; the condenser water then climbs and the chiller trips on high head pressure.

import { fitTrend } from "@/lib/plant/trend";
import { towersServing } from "@/lib/plant/site";
import { FAN_LOCKOUT_CHECK } from "./advice";
import { QUALIFIED_CAUTION, type Condition } from "./condition";
import { bool, chillersOf, num, str, type RuleContext } from "./context";
import { fmtDelta, fmtRate, fmtTemp } from "./format";
import { makeCondition } from "./make-condition";

export function towerFanNotRunning(ctx: RuleContext): Condition[] {
  const s = ctx.settings.towerFan;
  if (!s.enabled) return [];
  return ctx.site
    .filter((e) => e.kind === "cooling_tower")
    .flatMap((tower) => {
      const waterC = num(ctx, tower.tag, "condenser_water_leaving_temp");
      const setpointC = num(ctx, tower.tag, "condenser_water_temp_setpoint");
      if (waterC === null || setpointC === null) return [];
      const mode = str(ctx, tower.tag, "fan_drive_mode");
      const faulted = bool(ctx, tower.tag, "fan_drive_fault") === true;
      const speedPct = num(ctx, tower.tag, "fan_speed");
      const running = bool(ctx, tower.tag, "fan_status");
      const commandedNotRunning = speedPct !== null && speedPct >= s.commandedAtPct && running === false;
      const problem =
        mode === "off"
          ? "fan drive is in off"
          : faulted
            ? "fan drive is faulted"
            : commandedNotRunning
              ? "fan is commanded but not running"
              : null;

      const was = ctx.wasActive("tower_fan_not_running", tower.tag);
      const aboveK = waterC - setpointC;
      const fit = fitTrend(
        ctx.history.numbers(tower.tag, "condenser_water_leaving_temp", ctx.nowMs - s.riseWindowS * 1000, ctx.nowMs),
      );
      const riseKPerMin = fit ? fit.slopePerS * 60 : null;
      // "Rising above setpoint": above it and not falling (once raised, the dead band holds it).
      const hot = was ? aboveK > s.aboveSetpointK - s.deadBandK : aboveK > s.aboveSetpointK && (riseKPerMin ?? 0) >= 0;
      const active = problem !== null && hot;
      // A chiller it serves held off is better with the fan off: the fan would only cool the condenser
      // water toward the chilled water (the crossover rules' advice says when to bring it back).
      const served = chillersOf(ctx.site).filter((c) =>
        towersServing(ctx.site, c.tag).some((t) => t.tag === tower.tag),
      );
      const chillerRuns = !served.length || served.some((c) => bool(ctx, c.tag, "run_status") !== false);
      return [
        makeCondition({
          ruleId: "tower_fan_not_running",
          equipment: tower.tag,
          active,
          priority: s.priority,
          atMs: ctx.nowMs,
          technicianMessage: active
            ? `${tower.tag}: ${problem} while condenser water is ${fmtTemp(waterC)}, ${fmtDelta(aboveK)} above setpoint${riseKPerMin !== null ? ` and rising ${fmtRate(riseKPerMin)}` : ""}.`
            : `${tower.tag}: fan ${problem ?? "normal"}; condenser water ${fmtTemp(waterC)}.`,
          ownerMessage: active
            ? "A cooling-tower fan is not running when it is needed; the chiller may shut down on high pressure."
            : "Cooling-tower fans are working as needed.",
          advice: !active
            ? []
            : !chillerRuns
              ? [
                  "The chiller it serves is off: leave the fan off for now — running it would cool the condenser water toward the chilled water and bring a crossover closer. Restore it as the restart nears, so the head pressure holds once the compressor loads.",
                  FAN_LOCKOUT_CHECK,
                ]
              : mode === "off"
                ? [
                    FAN_LOCKOUT_CHECK,
                    "When it is safe and the reason is known, return the fan drive to auto at the drive or from the building controls: the running chiller needs the heat rejection now.",
                    "Confirm the fan runs and the condenser water starts to fall.",
                  ]
                : [
                    "Check the fan drive for a fault and reset it only once the cause is understood.",
                    "Confirm the fan runs and the condenser water starts to fall.",
                  ],
          caution: active ? QUALIFIED_CAUTION : null,
          numbers: { condenserWaterC: waterC, setpointC, aboveSetpointK: aboveK, riseKPerMin, fanSpeedPct: speedPct },
        }),
      ];
    });
}
