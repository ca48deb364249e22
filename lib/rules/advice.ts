// Advice that fits the plant's state: what helps while a stopped chiller's restart is far off
// (keep the condenser water up, take load off) harms as the restart nears (the compressor then
// needs heat rejection), so each step depends on where the chiller is, and says why in one line.

import type { ChillerStopReason } from "@/lib/quantities";

export interface ChillerState {
  running: boolean;
  /** Seconds until the chiller can start (anti-recycle timers, a reset); null when no one knows (held). */
  restartInS: number | null;
  /** Held off until a person acts: a latched trip to reset, or a chiller stopped by hand. */
  held: boolean;
  /** What the controller reports holds it off (`chiller_stop_reason`), when the site has that point. */
  stopReason?: ChillerStopReason | null;
  /** Seconds since the last start, when running. */
  sinceStartS: number | null;
}

export const TIMER_CAUTION =
  "Anti-recycle timers protect the motor and drive from too many starts: change them only within the manufacturer's limits, under supervision, and put them back afterwards.";
export const DRIVE_TRIP_CAUTION =
  "Do not keep resetting repeated drive-temperature trips — each restart into a poorly cooled drive heats it further; find the cause first.";
export const FAN_LOCKOUT_CHECK =
  "Before putting a fan drive back in auto, find out why it is off — lockout/tagout, maintenance, a vibration trip — and never override a lockout.";
export const PRACTICE_CAUTION =
  "Safety timers, resets and restarts are for qualified technicians: follow the manufacturer's procedures, local codes and licensed practice.";

const HOLD_CONDENSER_WATER_UP =
  "Keep the condenser water up: tower fan off or at minimum, tower bypass open where there is one, tower setpoint raised — while the chiller cannot run, the fan only cools the condenser water toward the chilled water.";
const SHED_LOAD =
  "Take load off the chilled-water loop: stop air handlers that can wait — less load slows the chilled water's rise toward the condenser water.";
const RESTORE_FAN =
  "As the restart nears, restore the tower fan — once the compressor loads it needs heat rejection, or the head pressure climbs back to the cut-out.";
const WATCH_DRIVE =
  "After the restart, watch the drive temperature for the first minutes on load — with little liquid in the condenser the motor and drive are poorly cooled; unload if it climbs.";
const RESET_HELD =
  "The chiller will not restart until its alarm is reset: read the fault log and clear the cause first; a mechanical high-pressure cut-out may need a hand reset at the device, so someone may need to go to site.";
const MANUAL_HELD =
  "The chiller was stopped by hand: it will not restart until someone enables it again — find out who stopped it and why before enabling it.";
const RAISE_LIFT =
  "Hold the condenser water up: raise the tower setpoint or the fan's minimum, open the tower bypass where there is one — the chiller's pressure difference falls with the condenser water.";

/** Steps for a chiller whose loops close toward the margin it needs to start, in the order to take them. */
export function crossoverAdvice(state: ChillerState, restartNearS: number, watchDriveForS: number): string[] {
  if (state.running) {
    if (state.sinceStartS !== null && state.sinceStartS < watchDriveForS) return [WATCH_DRIVE, RAISE_LIFT, SHED_LOAD];
    return [RAISE_LIFT, SHED_LOAD];
  }
  const near = !state.held && state.restartInS !== null && state.restartInS <= restartNearS;
  if (near) return [RESTORE_FAN, FAN_LOCKOUT_CHECK, WATCH_DRIVE];
  const steps = [HOLD_CONDENSER_WATER_UP, SHED_LOAD];
  if (state.held) steps.push(state.stopReason === "manual" ? MANUAL_HELD : RESET_HELD);
  steps.push(
    "If the restart will still come too late, shorten the anti-recycle timers only within the manufacturer's limits and under supervision, and put them back afterwards.",
  );
  return steps;
}

/** Cautions that apply to this state, joined. */
export function crossoverCaution(state: ChillerState): string {
  const parts = [PRACTICE_CAUTION, TIMER_CAUTION];
  if (state.running || (state.restartInS !== null && !state.held)) parts.push(DRIVE_TRIP_CAUTION);
  return parts.join(" ");
}
