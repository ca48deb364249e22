// Per-site rule settings with their defaults, validated with zod. Temperatures °C, temperature
// differences K, pressures kPa absolute, times s — the canonical units of lib/quantities.ts.
// Each default says where it comes from; see README.md for the reasoning.

import { z } from "zod";

const priority = z.union([z.literal(1), z.literal(2), z.literal(3), z.literal(4)]);
const seconds = z.number().min(0);
const positive = z.number().positive();

/** On/off delays every rule carries (ISA-18.2 alarm attributes). */
const delays = (onDelayS: number, offDelayS: number) => ({
  onDelayS: seconds.default(onDelayS),
  offDelayS: seconds.default(offDelayS),
});

const common = (p: 1 | 2 | 3 | 4, onDelayS: number, offDelayS: number) => ({
  enabled: z.boolean().default(true),
  priority: priority.default(p),
  ...delays(onDelayS, offDelayS),
});

export const ruleSettingsSchema = z.strictObject({
  crossoverRisk: z
    .strictObject({
      ...common(2, 30, 120),
      /** Warn when the projected time to crossover is under this. */
      warnTimeToCrossoverS: positive.default(30 * 60),
      /** …and the margin is under this (K): beyond it the loops are far apart whatever the trend. */
      warnMarginK: positive.default(30),
      /** Dead bands: once raised, clear only past warn + these. */
      timeDeadBandS: seconds.default(10 * 60),
      marginDeadBandK: seconds.default(1),
      /** Least-squares fit over this sliding event-time window. */
      fitWindowS: positive.default(10 * 60),
      minSamples: z.number().int().min(3).default(6),
      minSpanS: positive.default(60),
      /** Slower closing than this (K/min) counts as steady: sensor noise, not a trend. */
      minClosingRateKPerMin: positive.default(0.05),
      /** A second, long fit for slow drifts (a cold day over-cooling the condenser water). */
      slowFitWindowS: positive.default(60 * 60),
      slowMinSpanS: positive.default(15 * 60),
      slowMinClosingRateKPerMin: positive.default(0.005),
      /** A margin this small that is closing at all (either fit) is a risk whatever the projected time (K). */
      smallMarginK: positive.default(3),
      /**
       * A running chiller's projection counts only within this margin of the minimum (K): its lift
       * swings by several kelvin with load and staging (another chiller starting halves its load while
       * the tower catches up), and it is guarded by its own low-lift safety.
       */
      runningWarnMarginK: positive.default(5),
      /**
       * After a stop the fit waits this long (s): the shells' pressures fall from the running lift to
       * their waters' saturation in a minute or two, and that collapse is not the loops closing.
       */
      stopSettleS: seconds.default(180),
    })
    .prefault({}),
  restartRace: z
    .strictObject({
      ...common(1, 0, 120),
      /** Time a compressor needs from start until it carries load (common practice: a few minutes). */
      compressorLoadS: seconds.default(5 * 60),
      /** Time for someone to see the warning and act. */
      reactionAllowanceS: seconds.default(5 * 60),
      /** A chiller held by a latched alarm restarts only once someone resets it; a hand reset may mean reaching site (common practice: half an hour). */
      resetAllowanceS: seconds.default(30 * 60),
      /** A restart this close changes the advice from "keep the condenser water up" to "restore the tower fan" (a few minutes to bring a fan up). */
      restartNearS: seconds.default(5 * 60),
      /** How long after a restart the advice is to watch the drive temperature (common practice: the first quarter hour on load). */
      watchDriveForS: seconds.default(15 * 60),
      deadBandS: seconds.default(5 * 60),
    })
    .prefault({}),
  loopsCrossed: z
    .strictObject({
      ...common(1, 30, 60),
      /** Margin at or below which the loops count as crossed (K). */
      crossedAtMarginK: z.number().default(0),
      deadBandK: seconds.default(0.5),
    })
    .prefault({}),
  towerFan: z
    .strictObject({
      ...common(2, 60, 60),
      /** Condenser water this far above its setpoint counts as "above" (K). */
      aboveSetpointK: seconds.default(0.5),
      deadBandK: seconds.default(0.5),
      /** Window the rise is judged over. */
      riseWindowS: positive.default(5 * 60),
      /** Fan speed command at or above this means "commanded to run" (%). */
      commandedAtPct: z.number().min(0).max(100).default(5),
    })
    .prefault({}),
  /** Fan drive in off or hand while a chiller it serves runs: this shift's job, before the water shows it. */
  towerFanMode: z.strictObject({ ...common(3, 120, 60) }).prefault({}),
  /** Starts in the last hour against the chiller record's `maxStartsPerHour`. */
  startsPerHour: z.strictObject({ ...common(3, 0, 300) }).prefault({}),
  /** A sensor outside its physical range, jumping, frozen while running, or off its refrigerant's curve. */
  sensorPlausibility: z
    .strictObject({
      ...common(4, 60, 300),
      /** The same value this long while the equipment runs counts as frozen (common practice). */
      stuckAfterS: positive.default(60 * 60),
      /** …while its companion reading (the other water temperature of the barrel, or the shell's water for a pressure) moved this much, K or kPa. */
      companionMovedAtLeast: positive.default(1),
      /** Two readings this close together are compared for a jump. */
      rateWindowS: positive.default(60),
      /** Saturated temperature against its pressure on the refrigerant's curve (K); sensors of ±0.5 K and transducers of ±1 % stay well inside (common practice). */
      saturationToleranceK: positive.default(2),
    })
    .prefault({}),
  /** Chilled water leaving above its setpoint while the plant is called: the "it's warm in here" call. */
  chilledWaterNotMade: z
    .strictObject({
      ...common(3, 15 * 60, 5 * 60),
      /** Above the setpoint by more than this (K): 2.2 K = 4 °F, past normal control swing (common practice). */
      marginK: positive.default(2.2),
      deadBandK: seconds.default(0.5),
      /** After a start the loop is pulled down for up to this long before it counts (common practice). */
      pullDownS: seconds.default(30 * 60),
      /** Used when the chiller reports no setpoint: 44 °F, the usual comfort-cooling design (AHRI 550/590 rating condition). */
      defaultSetpointC: z.number().default(6.67),
    })
    .prefault({}),
  /** Pump commanded on but not proven; the 30 s on-delay is a flow-proof delay (common practice). */
  pumpProof: z.strictObject({ ...common(2, 30, 30) }).prefault({}),
  /** Flow through a chiller's barrel below a share of design while its pump is proven. */
  barrelFlow: z
    .strictObject({
      // 30 s: the same flow-proof delay, so a pump starting or a valve stroking is not a loss.
      ...common(2, 30, 60),
      /**
       * Below half the design flow (a quarter of the design ΔP): under most chillers' published minimum
       * barrel flow, and far under what a plant varying its flow runs at (common practice; the
       * manufacturer's minimum governs).
       */
      minFlowShare: z.number().min(0).max(1).default(0.5),
      deadBandShare: z.number().min(0).max(1).default(0.05),
    })
    .prefault({}),
  headPressure: z
    .strictObject({
      ...common(2, 15, 60),
      // The trip itself is the chiller's high condenser pressure cut-out, from its equipment record.
      /** Warn when the fitted rise reaches the cut-out within this: time to restore heat rejection or unload remotely. */
      warnTimeToTripS: positive.default(10 * 60),
      /** Projections count only this close to the cut-out (kPa): a start's normal climb from standby pressure is not a trip. */
      watchWithinKPa: positive.default(300),
      /** This close to the cut-out warns whatever the rate (kPa, ≈ 5 psi): a controller holding just under it is at its limit. */
      warnWithinKPa: positive.default(35),
      deadBandKPa: seconds.default(25),
      riseWindowS: positive.default(3 * 60),
      minRiseKPaPerMin: positive.default(2),
      /** No projection this long after a start, while the condenser pressure builds from standby. */
      startupGraceS: seconds.default(5 * 60),
    })
    .prefault({}),
  driveTemperature: z
    .strictObject({
      ...common(2, 15, 60),
      // The trip itself is the chiller's drive temperature trip, from its equipment record.
      warnWithinK: positive.default(10),
      warnTimeToTripS: positive.default(15 * 60),
      /** Projections count only above this (°C): a drive warming to its cooled temperature after a start (≈ 105 °F, common practice) is not heading for a trip. */
      watchAboveC: z.number().default(45),
      fitWindowS: positive.default(5 * 60),
      minRiseKPerMin: positive.default(0.2),
      deadBandK: seconds.default(1),
    })
    .prefault({}),
  powerEvent: z
    .strictObject({
      ...common(3, 0, 0),
      /** Drive faults this close together count as one event. */
      windowS: positive.default(30),
      minDrives: z.number().int().min(2).default(2),
      /** How long the hint stays up after the last correlated fault. */
      holdS: positive.default(30 * 60),
    })
    .prefault({}),
  chillerTrip: z.strictObject({ ...common(2, 0, 0), latching: z.boolean().default(true) }).prefault({}),
  commLost: z
    .strictObject({
      ...common(3, 0, 60),
      /** A point older than this (event time) is stale. */
      staleAfterS: positive.default(5 * 60),
    })
    .prefault({}),
  efficiencyDrift: z
    .strictObject({
      ...common(4, 30 * 60, 30 * 60),
      /** The equipment's own baseline, by chiller tag. */
      baselines: z
        .record(
          z.string(),
          z.strictObject({ kwPerTon: positive.optional(), condenserApproachK: z.number().optional() }),
        )
        .default({}),
      kwPerTonDriftFraction: positive.default(0.15),
      approachDriftK: positive.default(1.5),
      averagingWindowS: positive.default(60 * 60),
      sampleStepS: positive.default(60),
      /** Only compare at loads where the baseline applies. */
      minLoadFraction: z.number().min(0).max(1).default(0.3),
      minCoverage: z.number().min(0).max(1).default(0.5),
    })
    .prefault({}),
  lowEvaporatorPressure: z
    .strictObject({
      ...common(2, 15, 60),
      /** Saturated evaporating temperature at or below which freezing is a risk (°C; common practice ≈ 34 °F). */
      limitC: z.number().default(1.1),
      deadBandK: seconds.default(0.5),
      /** Suppressed by design while off and this long after a start, when evaporator pressure dips. */
      startupGraceS: seconds.default(5 * 60),
      // The cut-out itself is the chiller record's `lowEvapTempCutoutC`.
      /** Warn when the fitted fall reaches the cut-out within this (s): time to restore flow or raise the setpoint. */
      warnTimeToTripS: positive.default(10 * 60),
      /** Projections count only this close to the cut-out (K): a normal pull-down is far above it. */
      watchWithinK: positive.default(4),
      fitWindowS: positive.default(5 * 60),
      /** A fall slower than this (K/min) is drift, not a trip coming. */
      minFallKPerMin: positive.default(0.1),
    })
    .prefault({}),
});

export type RuleSettings = z.infer<typeof ruleSettingsSchema>;
export type RuleSettingsInput = z.input<typeof ruleSettingsSchema>;

export const defaultRuleSettings: RuleSettings = ruleSettingsSchema.parse({});

/** Validates stored or admin-edited settings, filling defaults. Throws a ZodError when invalid. */
export function parseRuleSettings(input: unknown): RuleSettings {
  return ruleSettingsSchema.parse(input ?? {});
}

/**
 * Limits that moved from rule settings to the chillers' equipment records. Overrides stored before
 * the move may still hold them; they are dropped on reading, so those sites keep loading (the
 * values themselves are now entered per chiller as limits).
 */
export const movedToEquipmentRecord = {
  headPressure: ["tripKPa", "tripKPaByTag"],
  driveTemperature: ["tripC", "tripCByTag"],
  timers: null,
} as const;

/** Stored overrides without the keys that moved to the equipment records. */
export function withoutMovedLimits(overrides: unknown): unknown {
  if (!overrides || typeof overrides !== "object" || Array.isArray(overrides)) return overrides;
  const out: Record<string, unknown> = { ...(overrides as Record<string, unknown>) };
  for (const [group, keys] of Object.entries(movedToEquipmentRecord)) {
    if (!(group in out)) continue;
    if (keys === null) {
      delete out[group];
      continue;
    }
    const g = out[group];
    if (!g || typeof g !== "object" || Array.isArray(g)) continue;
    const rest = { ...(g as Record<string, unknown>) };
    for (const k of keys) delete rest[k];
    out[group] = rest;
  }
  return out;
}
