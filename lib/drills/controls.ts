// What a trainee may do to a training plant from the drill panel, in plain words, with the caution the
// job calls for. Pure: shared by the panel, the service (step texts) and the debrief.
import type { DrillCommandBody } from "@/lib/schemas/drills";
import { drillTimerLimits } from "@/lib/schemas/drills";

export const DRILL_CAUTION =
  "Practice only: this is a simulated plant. On a real chiller, timers, resets and restarts follow the manufacturer's procedures, local codes and licensed practice — change timers only within the manufacturer's limits, under supervision, and put them back afterwards.";

export function describeDrillCommand(a: DrillCommandBody): string {
  switch (a.type) {
    case "set-fan-drive-mode":
      return `${a.equipment} fan drive to ${a.mode}`;
    case "set-air-handler":
      return a.run ? `Restore ${a.equipment} (run)` : `Shed ${a.equipment} (stop)`;
    case "set-anti-recycle-timer":
      return `${a.equipment} ${a.timer} timer to ${a.seconds} s`;
    case "reset-alarm":
      return `Reset ${a.equipment}'s latched trip`;
    case "set-chiller-enable":
      return `Start (enable) ${a.equipment}`;
  }
}

/** A timer outside the controller's limits is refused with the limits named. */
export function timerProblem(a: DrillCommandBody): string | null {
  if (a.type !== "set-anti-recycle-timer") return null;
  const lim = drillTimerLimits[a.timer];
  if (a.seconds < lim.min || a.seconds > lim.max)
    return `The ${a.timer} timer accepts ${lim.min}–${lim.max} s (controller limits; common practice, recalled).`;
  return null;
}
