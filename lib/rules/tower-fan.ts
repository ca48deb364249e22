// Rule 4: tower fan not running when needed. After a power blip a fan drive can come back
// in "off"; the condenser water then climbs and the chiller trips on high head pressure.

import { fitTrend } from "@/lib/plant/trend";
import { QUALIFIED_CAUTION, type Condition } from "./condition";
import { bool, num, str, type RuleContext } from "./context";
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
          advice: active
            ? [
                mode === "off"
                  ? "Return the fan drive to auto at the drive or from the building controls."
                  : "Check the fan drive for a fault and reset it if the cause is understood.",
                "Confirm the fan runs and the condenser water starts to fall.",
              ]
            : [],
          caution: active ? QUALIFIED_CAUTION : null,
          numbers: { condenserWaterC: waterC, setpointC, aboveSetpointK: aboveK, riseKPerMin, fanSpeedPct: speedPct },
        }),
      ];
    });
}
