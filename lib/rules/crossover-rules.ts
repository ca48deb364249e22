// Rules 1–3: crossover risk, restart race, loops crossed. They rest on the crossover margin
// (condenser water minus chilled water, both entering the chiller) and its least-squares
// projection to zero (lib/plant/crossover.ts).

import type { Equipment } from "@/lib/plant/site";
import type { ChillerSnapshot } from "@/lib/plant/snapshot";
import type { TimeToCrossoverResult } from "@/lib/plant/crossover";
import { QUALIFIED_CAUTION, type Condition } from "./condition";
import { bool, chillerCalledFor, chillersOf, str, type RuleContext } from "./context";
import { formatDuration } from "@/lib/units";
import { fmtDelta, fmtRate } from "./format";
import { makeCondition } from "./make-condition";

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
  };
}

const RECOVERY_STEPS = [
  "Restore heat rejection: put the tower fan drive back in auto and confirm the fan runs.",
  "Shed air-handler load to slow the chilled-water loop's warming.",
  "Shorten the anti-recycle timers only as far as the manufacturer allows, and only under supervision.",
  "Start the compressor before the loops cross; once crossed, follow the manufacturer's procedure before any restart.",
];

export function crossoverRisk(ctx: RuleContext): Condition[] {
  const s = ctx.settings.crossoverRisk;
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
    const closingSoon = t !== null && t.timeToCrossoverS <= warnS && t.fittedMarginK <= warnMarginK;
    const smallAndClosing = t !== null && t.fittedMarginK <= smallMarginK;
    // Once raised, the risk stays up through the crossing itself; "loops crossed" then adds its alarm.
    const active =
      calledFor && (closingSoon || smallAndClosing || (was && (crossed || (v.crossoverMarginK ?? 1) <= 0)));
    const n = crossoverNumbers(v);
    const when = n.timeToCrossoverS !== null ? `in about ${formatDuration(n.timeToCrossoverS)}` : "soon";
    const band = t
      ? ` (fit band ${formatDuration(t.earliestS)}–${Number.isFinite(t.latestS) ? formatDuration(t.latestS) : "open"})`
      : "";
    return [
      makeCondition({
        ruleId: "crossover_risk",
        equipment: chiller.tag,
        active,
        priority: s.priority,
        atMs: ctx.nowMs,
        technicianMessage: active
          ? `${chiller.tag}: condenser water is only ${fmtDelta(n.marginK ?? 0)} above chilled water and closing at ${fmtRate(n.closingRateKPerMin ?? 0)}; the loops cross ${when}${band}.`
          : `${chiller.tag}: crossover margin ${n.marginK === null ? "unknown" : fmtDelta(n.marginK)}, not closing toward a crossover.`,
        ownerMessage: active
          ? `The cooling plant is drifting toward a condition that can stop the chiller from restarting. Expected ${when}.`
          : "The chilled-water and condenser-water loops are in a safe relationship.",
        advice: active ? RECOVERY_STEPS : [],
        caution: active ? QUALIFIED_CAUTION : null,
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
    const neededS = lockoutS + s.compressorLoadS + s.reactionAllowanceS;
    const off = v.running === false;
    const ttcS = closing ? closing.timeToCrossoverS : crossed ? 0 : null;
    // A latched alarm holds the compressor off until a person resets it: no timer will end the wait.
    const latched = bool(ctx, chiller.tag, "chiller_alarm") === true;
    const latchedText = latched ? str(ctx, chiller.tag, "fault_text") : null;
    // The race is lost when the loops cross before the compressor can be back on load.
    const active =
      off && chillerCalledFor(ctx, chiller) && ttcS !== null && (latched || ttcS < neededS + (was ? s.deadBandS : 0));
    const n = {
      ...crossoverNumbers(v),
      compressorLoadS: s.compressorLoadS,
      restartNeedsS: latched ? null : neededS,
      latchedAlarm: Number(latched),
    };
    const held = latched
      ? `is off on a latched alarm${latchedText && latchedText !== "none" ? ` ("${latchedText}")` : ""} and will not restart until someone resets it (anti-recycle ${formatDuration(lockoutS)} left)`
      : `is off and locked out for ${formatDuration(lockoutS)} more`;
    return [
      makeCondition({
        ruleId: "restart_race",
        equipment: chiller.tag,
        active,
        priority: s.priority,
        atMs: ctx.nowMs,
        technicianMessage: active
          ? `${chiller.tag} ${held}; the loops cross in about ${formatDuration(ttcS!)}, before a restart could be on load (${formatDuration(s.compressorLoadS)} to load after the start). The restart will come too late unless someone acts.`
          : `${chiller.tag}: no restart race (${off ? "off" : "running"}, lockout ${formatDuration(lockoutS)} left).`,
        ownerMessage: active
          ? "The chiller is waiting out its restart delay, and the plant may reach a state where it cannot restart before that delay ends. The on-call technician needs to act."
          : "No restart problem expected.",
        advice: active ? RECOVERY_STEPS : [],
        caution: active ? QUALIFIED_CAUTION : null,
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
    if (!v || v.crossoverMarginK === null) return [];
    const was = ctx.wasActive("loops_crossed", chiller.tag);
    const limitK = s.crossedAtMarginK + (was ? s.deadBandK : 0);
    const tempCrossed = v.crossoverMarginK <= limitK;
    // While running, condenser pressure at or below evaporator pressure is the same fault seen from the refrigerant.
    const pressureCrossed = v.crossoverPressureMarginKPa !== null && v.crossoverPressureMarginKPa <= 0;
    const active = chillerCalledFor(ctx, chiller) && (tempCrossed || pressureCrossed);
    return [
      makeCondition({
        ruleId: "loops_crossed",
        equipment: chiller.tag,
        active,
        priority: s.priority,
        atMs: ctx.nowMs,
        technicianMessage: active
          ? `${chiller.tag}: loops crossed — chilled water is ${fmtDelta(-v.crossoverMarginK)} warmer than condenser water${pressureCrossed ? ", condenser pressure at or below evaporator pressure" : ""}. Refrigerant sits in the condenser; a restart risks a drive over-temperature trip.`
          : `${chiller.tag}: loops not crossed (margin ${fmtDelta(v.crossoverMarginK)}).`,
        ownerMessage: active
          ? "The chiller's water loops are in a state where it cannot restart normally. A technician must follow the manufacturer's recovery procedure."
          : "The chiller's water loops are in a normal relationship.",
        advice: active
          ? [
              "Raise the condenser water temperature: reduce tower fan speed or bypass the tower as the plant allows.",
              "Shed air-handler load.",
              "Follow the manufacturer's procedure for starting with crossed loops; do not repeatedly attempt restarts.",
            ]
          : [],
        caution: active ? QUALIFIED_CAUTION : null,
        numbers: crossoverNumbers(v),
      }),
    ];
  });
}
