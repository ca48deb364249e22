// Rules 1–3: crossover risk, restart race, loops crossed. They rest on the crossover margin
// (condenser water minus chilled water, both entering the chiller) and its least-squares
// projection to zero (lib/plant/crossover.ts).

import { asRefrigerant, limitsOf } from "@/lib/plant/equipment-limits";
import { refrigerantMarginK } from "@/lib/plant/crossover";
import { saturationTempC } from "@/lib/refrigerant";
import type { Equipment } from "@/lib/plant/site";
import type { ChillerSnapshot } from "@/lib/plant/snapshot";
import type { TimeToCrossoverResult } from "@/lib/plant/crossover";
import type { Condition } from "./condition";
import { crossoverAdvice, crossoverCaution, type ChillerState } from "./advice";
import { lastEdgeMs } from "./history";
import { bool, chillerCalledFor, chillersOf, num, str, type RuleContext } from "./context";
import { formatDuration } from "@/lib/units";
import { fmtDelta, fmtPressure, fmtRate } from "./format";
import { makeCondition } from "./make-condition";
import { chillerStopReasons, type ChillerStopReason } from "@/lib/quantities";

function chillerView(ctx: RuleContext, chiller: Equipment): ChillerSnapshot | undefined {
  return ctx.snapshot.chillers.find((c) => c.tag === chiller.tag);
}

type Closing = Extract<TimeToCrossoverResult, { status: "closing" }>;

/** The sooner of the short- and long-window projections, and whether either sees the loops crossed. */
export function crossoverOutlook(s: ChillerSnapshot): {
  closing: (Closing & { fit: "short" | "long" }) | null;
  crossed: boolean;
} {
  const fits = [
    { r: s.timeToCrossover, fit: "short" as const },
    { r: s.slowTimeToCrossover, fit: "long" as const },
  ];
  const crossed = fits.some((f) => f.r?.status === "crossed");
  let closing: (Closing & { fit: "short" | "long" }) | null = null;
  for (const f of fits)
    if (f.r?.status === "closing" && (!closing || f.r.timeToCrossoverS < closing.timeToCrossoverS))
      closing = { ...f.r, fit: f.fit };
  return { closing, crossed };
}

function crossoverNumbers(s: ChillerSnapshot): Record<string, number | null> {
  const { closing, crossed } = crossoverOutlook(s);
  const short = s.timeToCrossover;
  return {
    marginK:
      closing?.fittedMarginK ??
      (short && short.status !== "insufficient_data" ? short.fittedMarginK : s.crossoverMarginK),
    measuredMarginK: s.crossoverMarginK,
    pressureMarginKPa: s.crossoverPressureMarginKPa,
    timeToCrossoverS: closing ? closing.timeToCrossoverS : crossed ? 0 : null,
    timeToCrossoverEarliestS: closing?.earliestS ?? null,
    timeToCrossoverLatestS: closing && Number.isFinite(closing.latestS) ? closing.latestS : null,
    closingRateKPerMin:
      closing?.closingRateKPerMin ?? (short?.status === "not_closing" ? short.closingRateKPerMin : null),
    fitResidualK: closing?.residualStdDevK ?? null,
    lockoutLeftS: s.lockout.lockoutLeftS,
    startMarginK: s.startMarginK,
    refrigerantBasis: s.marginBasis === null ? null : Number(s.marginBasis === "refrigerant"),
  };
}

/** Where the chiller stands on the way back to running: what the advice and the race turn on. */
export function chillerState(ctx: RuleContext, chiller: Equipment, v: ChillerSnapshot): ChillerState {
  const s = ctx.settings.restartRace;
  const running = v.running === true;
  // The controller's stop reason says what holds the compressor off: a trip is latched until a
  // person resets it (so is a chiller stopped by hand); a safety resets itself once its cause
  // clears; low load and the schedule restart by themselves when the timers allow. Without that
  // point, a latched alarm or a drive fault is taken as held.
  const reason = stopReasonOf(str(ctx, chiller.tag, "chiller_stop_reason"));
  const held =
    !running &&
    (reason !== null
      ? reason === "trip" || reason === "manual"
      : bool(ctx, chiller.tag, "chiller_alarm") === true || bool(ctx, chiller.tag, "drive_fault") === true);
  const lockoutS = v.lockout.lockoutLeftS;
  const startMs = lastEdgeMs(ctx.history.edges(chiller.tag, "run_status", ctx.nowMs).rises);
  return {
    running,
    held,
    stopReason: running ? "running" : reason,
    restartInS: running ? 0 : held ? Math.max(lockoutS, s.resetAllowanceS) : lockoutS,
    sinceStartS: running && startMs !== null ? (ctx.nowMs - startMs) / 1000 : null,
  };
}

const stopReasonOf = (v: string | null): ChillerStopReason | null =>
  v !== null && (chillerStopReasons as readonly string[]).includes(v) ? (v as ChillerStopReason) : null;

/** Stopped on low load or by its schedule with its timers run out: it starts when the load calls for it. */
export const onDemand = (state: ChillerState): boolean =>
  !state.running &&
  !state.held &&
  (state.stopReason === "low_load" || state.stopReason === "schedule") &&
  (state.restartInS ?? 0) <= 0;

/** Seconds until a stopped chiller could be back on load (start, then soft-load). */
export function backOnLoadS(ctx: RuleContext, state: ChillerState): number {
  return (state.restartInS ?? 0) + ctx.settings.restartRace.compressorLoadS;
}

const basisText = (v: ChillerSnapshot) =>
  v.marginBasis === "refrigerant" ? "refrigerant pressures" : "entering water temperatures";

export function crossoverRisk(ctx: RuleContext): Condition[] {
  const s = ctx.settings.crossoverRisk;
  const race = ctx.settings.restartRace;
  if (!s.enabled) return [];
  return chillersOf(ctx.site).flatMap((chiller) => {
    const v = chillerView(ctx, chiller);
    if (!v) return [];
    const { closing: t, crossed } = crossoverOutlook(v);
    const was = ctx.wasActive("crossover_risk", chiller.tag);
    const warnS = s.warnTimeToCrossoverS + (was ? s.timeDeadBandS : 0);
    const warnMarginK = s.warnMarginK + (was ? s.marginDeadBandK : 0);
    const smallMarginK = s.smallMarginK + (was ? s.marginDeadBandK : 0);
    const calledFor = chillerCalledFor(ctx, chiller);
    const state = chillerState(ctx, chiller, v);
    // A stopped chiller that will restart by itself is at risk only if the margin closes before it
    // can be back on load (plus time for someone to act): the normal stop-to-start after a blip is not.
    // One stopped on low load or its schedule with its timers run out starts as soon as the chilled
    // water calls for it — the same warming that closes the margin — so only a margin already a dead
    // band below the start margin is a risk there (a start a little under it normally still loads).
    const selfRestartS = !state.running && !state.held ? backOnLoadS(ctx, state) + race.reactionAllowanceS : null;
    const beforeRestart =
      selfRestartS === null ||
      (onDemand(state)
        ? t !== null && t.fittedMarginK <= (was ? 0 : -s.marginDeadBandK)
        : t !== null && t.timeToCrossoverS <= selfRestartS + (was ? s.timeDeadBandS : 0));
    const projectWithinK = state.running
      ? Math.min(warnMarginK, s.runningWarnMarginK + (was ? s.marginDeadBandK : 0))
      : warnMarginK;
    const closingSoon = t !== null && t.timeToCrossoverS <= warnS && t.fittedMarginK <= projectWithinK;
    const smallAndClosing = t !== null && t.fittedMarginK <= smallMarginK;
    // Whenever the restart race is lost (rule 2), the risk is up too, however wide the margin still is:
    // a critical page never comes without the warning that explains it.
    const raceLost =
      !state.running &&
      !onDemand(state) &&
      t !== null &&
      t.timeToCrossoverS < backOnLoadS(ctx, state) + (was ? race.deadBandS : 0);
    // Once raised, the risk stays up through the crossing itself; "loops crossed" then adds its alarm.
    const active =
      calledFor &&
      (((closingSoon || smallAndClosing) && beforeRestart) ||
        raceLost ||
        (was && (crossed || (v.crossoverMarginK ?? 1) <= 0)));
    const n: Record<string, number | null> = { ...crossoverNumbers(v), restartInS: state.restartInS };
    const when = n.timeToCrossoverS !== null ? `in about ${formatDuration(n.timeToCrossoverS)}` : "soon";
    const band = t
      ? ` (fit band ${formatDuration(t.earliestS)}–${Number.isFinite(t.latestS) ? formatDuration(t.latestS) : "open"})`
      : "";
    const what = state.running
      ? `running with its condenser − evaporator pressure difference ${v.crossoverPressureMarginKPa === null ? "" : `(${fmtPressure(v.crossoverPressureMarginKPa, true)}) `}falling toward the ${fmtPressure(limitsOf(chiller).minStartLiftKPa, true)} it needs`
      : `off, its margin (from ${basisText(v)}) only ${fmtDelta(n.marginK ?? 0)} above the ${fmtDelta(v.startMarginK ?? 0)} it needs to start`;
    return [
      makeCondition({
        ruleId: "crossover_risk",
        equipment: chiller.tag,
        active,
        priority: s.priority,
        atMs: ctx.nowMs,
        technicianMessage: active
          ? `${chiller.tag}: ${what}, closing at ${fmtRate(n.closingRateKPerMin ?? 0)}; it reaches that ${when}${band}.`
          : `${chiller.tag}: crossover margin ${n.marginK === null ? "unknown" : fmtDelta(n.marginK)} above its start margin, not closing toward it.`,
        ownerMessage: active
          ? `The cooling plant is drifting toward a condition that can stop the chiller from ${state.running ? "running" : "restarting"}. Expected ${when}.`
          : "The chilled-water and condenser-water loops are in a safe relationship.",
        advice: active ? crossoverAdvice(state, race.restartNearS, race.watchDriveForS) : [],
        caution: active ? crossoverCaution(state) : null,
        numbers: n,
      }),
    ];
  });
}

export function restartRace(ctx: RuleContext): Condition[] {
  const s = ctx.settings.restartRace;
  if (!s.enabled) return [];
  return chillersOf(ctx.site).flatMap((chiller) => {
    const v = chillerView(ctx, chiller);
    if (!v) return [];
    const { closing, crossed } = crossoverOutlook(v);
    const was = ctx.wasActive("restart_race", chiller.tag);
    const lockoutS = v.lockout.lockoutLeftS;
    const state = chillerState(ctx, chiller, v);
    // A chiller waiting only for load has no timer to race: it starts when the chilled water calls
    // (crossover_risk and loops_crossed still watch its margin).
    const neededS = backOnLoadS(ctx, state);
    const off = v.running === false;
    const ttcS = closing ? closing.timeToCrossoverS : crossed ? 0 : null;
    const latchedText = state.held ? str(ctx, chiller.tag, "fault_text") : null;
    // The race is lost when the margin reaches what a start needs before the compressor can be back on load.
    const active =
      off &&
      !onDemand(state) &&
      chillerCalledFor(ctx, chiller) &&
      ttcS !== null &&
      ttcS < neededS + (was ? s.deadBandS : 0);
    const n = {
      ...crossoverNumbers(v),
      compressorLoadS: s.compressorLoadS,
      restartNeedsS: neededS,
      restartInS: state.restartInS,
      latchedAlarm: Number(state.held),
    };
    const held = state.held
      ? `is held off${latchedText && latchedText !== "none" ? ` ("${latchedText}")` : ""} until someone ${state.stopReason === "manual" ? "enables it again" : "resets it"} (anti-recycle ${formatDuration(lockoutS)} left; ${formatDuration(s.resetAllowanceS)} allowed to reach and reset it)`
      : `is off and locked out for ${formatDuration(lockoutS)} more`;
    return [
      makeCondition({
        ruleId: "restart_race",
        equipment: chiller.tag,
        active,
        priority: s.priority,
        atMs: ctx.nowMs,
        technicianMessage: active
          ? `${chiller.tag} ${held}; its margin reaches the ${fmtDelta(v.startMarginK ?? 0)} a start needs in about ${formatDuration(ttcS!)}, before it could be back on load in ${formatDuration(neededS)}. The restart will come too late unless someone acts.`
          : `${chiller.tag}: no restart race (${off ? "off" : "running"}, lockout ${formatDuration(lockoutS)} left).`,
        ownerMessage: active
          ? "The chiller is waiting to restart, and the plant may reach a state where it cannot restart before then. The on-call technician needs to act."
          : "No restart problem expected.",
        advice: active ? crossoverAdvice(state, s.restartNearS, s.watchDriveForS) : [],
        caution: active ? crossoverCaution(state) : null,
        numbers: n,
      }),
    ];
  });
}

export function loopsCrossed(ctx: RuleContext): Condition[] {
  const s = ctx.settings.loopsCrossed;
  if (!s.enabled) return [];
  return chillersOf(ctx.site).flatMap((chiller) => {
    const v = chillerView(ctx, chiller);
    if (!v || (v.crossoverMarginK === null && v.crossoverPressureMarginKPa === null)) return [];
    const was = ctx.wasActive("loops_crossed", chiller.tag);
    const limitK = s.crossedAtMarginK + (was ? s.deadBandK : 0);
    // The shells' pressures are the direct reading (running: the lift; stopped: each shell's
    // saturation); entering water temperatures only stand in when the site has no pressures.
    const byPressure = v.crossoverPressureMarginKPa !== null;
    const condKPa = num(ctx, chiller.tag, "condenser_refrigerant_pressure");
    const evapKPa = num(ctx, chiller.tag, "evaporator_refrigerant_pressure");
    const refrigerant = asRefrigerant(chiller.refrigerant) ?? "R-134a";
    // Judged as saturated temperatures, so the dead band is the same kelvin as for water.
    const shellMarginK =
      condKPa !== null && evapKPa !== null
        ? refrigerantMarginK((p) => saturationTempC(refrigerant, p), condKPa, evapKPa)
        : null;
    const pressureCrossed = byPressure && shellMarginK !== null && shellMarginK <= limitK;
    const tempCrossed = !byPressure && v.crossoverMarginK !== null && v.crossoverMarginK <= limitK;
    const active = chillerCalledFor(ctx, chiller) && (tempCrossed || pressureCrossed);
    const state = chillerState(ctx, chiller, v);
    return [
      makeCondition({
        ruleId: "loops_crossed",
        equipment: chiller.tag,
        active,
        priority: s.priority,
        atMs: ctx.nowMs,
        technicianMessage: active
          ? `${chiller.tag}: loops crossed — ${byPressure ? `condenser refrigerant pressure ${fmtPressure(-v.crossoverPressureMarginKPa!, true)} below evaporator pressure` : `chilled water ${fmtDelta(-v.crossoverMarginK!)} warmer than condenser water`}. Refrigerant sits in the condenser; a restart risks a drive over-temperature trip.`
          : `${chiller.tag}: loops not crossed.`,
        ownerMessage: active
          ? "The chiller's water loops are in a state where it cannot restart normally. A technician must follow the manufacturer's recovery procedure."
          : "The chiller's water loops are in a normal relationship.",
        advice: active
          ? [
              ...crossoverAdvice(state, ctx.settings.restartRace.restartNearS, ctx.settings.restartRace.watchDriveForS),
              "Follow the manufacturer's procedure for starting with crossed loops; do not repeatedly attempt restarts.",
            ]
          : [],
        caution: active ? crossoverCaution(state) : null,
        numbers: crossoverNumbers(v),
      }),
    ];
  });
}
