// A drill's score on the outcomes that matter on a bad night: the loops did not cross, the drive stayed
// below its trip, the first useful action came soon after the first warning, and temporary changes
// (shortened timers, shed air handlers) were put back. Pure: facts in, parts and a percentage out.

import type { DrillEndReason, DrillFacts } from "./tracker";

export type DrillOutcome = "avoided" | "crossed" | "timed_out" | "stopped";

export interface DrillStepFact {
  atMs: number;
  kind: "command" | "ack" | "note";
  /** The command sent (commands only). */
  action?: { type: string; equipment: string; [k: string]: unknown };
}

export interface ScorePart {
  key: "crossover_avoided" | "drive_below_trip" | "first_action" | "changes_put_back";
  label: string;
  points: number;
  max: number;
  /** What was measured, in words (no colour needed to read it). */
  detail: string;
}

export interface DrillScore {
  outcome: DrillOutcome;
  endReason: DrillEndReason;
  parts: ScorePart[];
  pct: number;
  /** Seconds from the first warning to the first useful action, or null. */
  firstActionAfterS: number | null;
}

/** Full marks for a first useful action within this long of the first warning (assumed, see below). */
export const FIRST_ACTION_FULL_S = 5 * 60;
/** No marks from this long on (assumed: in the power-blip plant the loops cross ~90 min after the trip, and a
 *  restart needs the timers and the reset done well before that). */
export const FIRST_ACTION_ZERO_S = 30 * 60;

/**
 * Commands that help on the way to a safe restart: fan back to auto, load shed, timers shortened,
 * a latched trip reset, a chiller enabled. Putting things back (air handler on, timers up) is not a
 * first response; turning the fan off is scored by its effect on the outcome, not here.
 */
export function isUsefulAction(
  a: NonNullable<DrillStepFact["action"]>,
  timerDefaults: Record<string, number>,
): boolean {
  switch (a.type) {
    case "set-fan-drive-mode":
      return a.mode === "auto";
    case "set-air-handler":
      return a.run === false;
    case "set-anti-recycle-timer":
      return typeof a.seconds === "number" && a.seconds < (timerDefaults[String(a.timer)] ?? Infinity);
    case "reset-alarm":
    case "set-chiller-enable":
      return true;
    default:
      return false;
  }
}

export function scoreDrill(input: {
  facts: DrillFacts;
  endReason: DrillEndReason;
  /** Event time of the first alarm activation during the drill, ms. */
  firstWarningMs: number | null;
  steps: readonly DrillStepFact[];
  driveTripC: number;
  timerDefaults: Record<string, number>;
}): DrillScore {
  const { facts, endReason, steps } = input;
  const crossed = facts.crossedAtMs !== null;
  // On time without a crossing: avoided when every chiller that ran is running again, else the crossing was
  // only not reached yet (a chiller still down).
  const stillDown = facts.chillers.some((c) => c.everRan && !c.running && c.trippedAtMs !== null);
  const outcome: DrillOutcome =
    endReason === "stopped"
      ? "stopped"
      : crossed
        ? "crossed"
        : endReason === "recovery" || !stillDown
          ? "avoided"
          : "timed_out";

  const parts: ScorePart[] = [];
  parts.push({
    key: "crossover_avoided",
    label: "Crossover avoided",
    max: 40,
    points: crossed ? 0 : 40,
    detail: crossed
      ? `The refrigerant pressures inverted ${fmtMin(facts.crossedAtMs! - facts.startedAtMs)} into the drill${
          facts.failedRestart
            ? `; the restart at ${fmtMin(facts.failedRestart.atMs - facts.startedAtMs)} stopped again (${facts.failedRestart.stopReason}${facts.failedRestart.faultText ? `: ${facts.failedRestart.faultText}` : ""})`
            : ""
        }.`
      : "The condenser stayed above the evaporator throughout.",
  });

  const peak = facts.drivePeakC;
  const below = peak === null || peak < input.driveTripC;
  parts.push({
    key: "drive_below_trip",
    label: "Drive temperature below trip",
    max: 20,
    points: below ? 20 : 0,
    detail:
      peak === null
        ? "No drive temperature was read."
        : `Peak ${peak.toFixed(1)} °C against a ${input.driveTripC.toFixed(1)} °C trip${below ? "" : ": the drive tripped or reached its trip"}.`,
  });

  const firstUseful =
    input.firstWarningMs === null
      ? undefined
      : steps.find(
          (s) =>
            s.kind === "command" &&
            s.action &&
            s.atMs >= input.firstWarningMs! &&
            isUsefulAction(s.action, input.timerDefaults),
        );
  const firstActionAfterS = firstUseful ? (firstUseful.atMs - input.firstWarningMs!) / 1000 : null;
  if (input.firstWarningMs !== null) {
    const pts =
      firstActionAfterS === null
        ? 0
        : firstActionAfterS <= FIRST_ACTION_FULL_S
          ? 20
          : firstActionAfterS >= FIRST_ACTION_ZERO_S
            ? 0
            : Math.round(
                (20 * (FIRST_ACTION_ZERO_S - firstActionAfterS)) / (FIRST_ACTION_ZERO_S - FIRST_ACTION_FULL_S),
              );
    parts.push({
      key: "first_action",
      label: "First useful action after the first warning",
      max: 20,
      points: pts,
      detail:
        firstActionAfterS === null
          ? "No useful action after the first warning."
          : `${fmtMin(firstActionAfterS * 1000)} after the first warning (full marks within ${FIRST_ACTION_FULL_S / 60} min).`,
    });
  }

  // Put back: every timer shortened is at or above its starting value at the end; every air handler shed runs again.
  const notBack: string[] = [];
  for (const c of facts.chillers)
    for (const [timer, t] of Object.entries(c.timers))
      if (t.first !== null && t.last !== null && t.last < t.first) notBack.push(`${c.tag} ${timer} timer ${t.last} s`);
  // An air handler counts as put back when the trainee's last command for it started it again.
  const lastAhu = new Map<string, boolean>();
  for (const s of steps)
    if (s.action?.type === "set-air-handler") lastAhu.set(s.action.equipment, s.action.run === true);
  for (const [tag, run] of lastAhu) if (!run) notBack.push(`${tag} still stopped`);
  const changed =
    lastAhu.size > 0 ||
    facts.chillers.some((c) => Object.values(c.timers).some((t) => t.first !== null && t.last !== t.first)) ||
    steps.some((s) => s.action?.type === "set-anti-recycle-timer");
  parts.push({
    key: "changes_put_back",
    label: "Temporary changes put back",
    max: 20,
    points: notBack.length === 0 ? 20 : 0,
    detail: !changed
      ? "No temporary changes were made."
      : notBack.length === 0
        ? "Timers and air handlers were put back."
        : `Not put back: ${notBack.join("; ")}.`,
  });

  const max = parts.reduce((n, p) => n + p.max, 0);
  const got = parts.reduce((n, p) => n + p.points, 0);
  return { outcome, endReason, parts, pct: Math.round((1000 * got) / max) / 10, firstActionAfterS };
}

function fmtMin(ms: number): string {
  const m = ms / 60_000;
  return m < 1 ? `${Math.round(ms / 1000)} s` : `${m.toFixed(1)} min`;
}
