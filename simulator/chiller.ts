// One water-cooled chiller with a variable-speed oil-free centrifugal compressor: its controller
// (start/stop, capacity, safeties, anti-recycle timers) and its physics (water side, refrigerant, drive).
import { saturationPressureKPa } from "@/lib/refrigerant";
import type { ChillerStopReason } from "@/lib/quantities";
import type { ChillerParams, ChillerState, FaultEntry, ModelEvent } from "./state";
import { fToC, KPA_PER_PSI, kpaAbsToPsig, WATER_HEAT_CAPACITY_KJ_PER_LK as cpW } from "@/lib/plant/units";

/** Drive over-temperature trip 150 °F, cooling target 105 °F (common practice, recalled). */
export const driveTripC = fToC(150);
const driveCoolingSetpointC = fToC(105);
/** Proportional band of the drive-cooling solenoid, K (assumed). */
const driveCoolingBandK = 3;
/** Pressure difference at which the motor/drive liquid feed reaches full flow: 30 psid (assumed). */
const fullCoolingDpKPa = 30 * KPA_PER_PSI;
/** Low evaporator pressure: saturated temperature below 33 °F for 30 s (common practice, freeze protection). */
const lowEvapTripC = fToC(33);
/** A barrel's flow switch opens below this share of design flow (a paddle or ΔP switch; recalled, not verified). */
export const flowSwitchShare = 0.25;
/** Chiller start differential above setpoint and low-load stop below it (common practice). */
const startDiffK = 1.1;
const lowLoadStopK = 1.4;
/** Minimum stable capacity of an oil-free centrifugal, fraction of rated (common practice 10–20 %). */
const minCapacityFraction = 0.15;
/**
 * The surge line: at high lift a centrifugal cannot unload as far before it surges, so its lowest stable
 * capacity rises from the 15 % minimum at design lift to 60 % at 1.25× design lift (common practice in shape; the
 * numbers are assumed). The head-pressure limit cannot unload below it.
 */
export function minStableFraction(liftK: number, designLiftK: number): number {
  const r = liftK / designLiftK;
  return Math.min(
    0.6,
    Math.max(minCapacityFraction, minCapacityFraction + ((r - 1) / 0.25) * (0.6 - minCapacityFraction)),
  );
}
/** Soft-load: capacity ceiling climbs from 20 % to 100 % over 180 s after a start (common practice). */
const softLoadPerS = 0.8 / 180;
/** Second-law efficiency of the compressor cycle vs. part load (calibrated so design kW/ton ≈ 0.54). */
const peakCycleEfficiency = 0.74;
const fixedLossFraction = 0.015;
/**
 * High condenser pressure limit ahead of the cut-out: hold capacity and speed above 90 % of the cut-out
 * pressure, unload above 95 % (common practice, recalled, not verified); reload below 88 %. Unload and
 * reload rates, 0.2 % of rated capacity per second, are assumed.
 */
export const headHoldFraction = 0.9;
export const headUnloadFraction = 0.95;
const headReleaseFraction = 0.88;
const headUnloadPerS = 0.002;
const headReloadPerS = 0.002;
/**
 * Low-lift safety: after a 5-minute start-up allowance (lift builds while the compressor loads; assumed),
 * the compressor stops when condenser − evaporator pressure difference stays below the minimum for 60 s
 * (delay assumed; the minimum itself is the equipment-limit default, recalled, not verified).
 */
export const minLiftStartupS = 300;
export const minLiftDelayS = 60;
/** Evaporator liquid feed through the expansion device: ∝ √ΔP, full at 100 kPa (orifice flow; 100 kPa assumed). */
const fullFeedDpKPa = 100;
/** How far suction falls below its normal value when the evaporator gets no liquid, K (assumed). */
const starvedSuctionDropK = 6;
/** Dead leg: a condenser-water sensor in still water drifts to the plant-room air with a 10-minute time constant (assumed). */
export const deadLegTauS = 600;

export interface ChillerEnv {
  tS: number;
  dt: number;
  chwInC: number;
  cwInC: number;
  chwPumpOn: boolean;
  cwPumpOn: boolean;
  powerOk: boolean;
  powerJustRestored: boolean;
  roomC: number;
}

export interface ChillerSink {
  events: ModelEvent[];
  faults: FaultEntry[];
}

export function restartInhibitLeftS(c: ChillerState, tS: number): number {
  return Math.max(0, c.lastStartS + c.startToStartS - tS, c.lastStopS + c.stopToStartS - tS);
}

/** Capacity available at a lift, fraction of rated: full up to 1.2× design lift, falling toward surge. */
export function liftCapacityFraction(liftK: number, designLiftK: number): number {
  const r = liftK / designLiftK;
  if (r <= 1.2) return 1.02;
  if (r <= 1.6) return 1.02 - ((r - 1.2) / 0.4) * 0.42;
  return Math.max(0.3, 0.6 - ((r - 1.6) / 0.2) * 0.3);
}

function cycleEfficiency(plr: number): number {
  const x = (plr - 0.75) / 0.75;
  return peakCycleEfficiency * (1 - 0.35 * x * x);
}

export function evapPressureKPa(p: ChillerParams, c: ChillerState): number {
  return saturationPressureKPa(p.refrigerant, c.evapSatC);
}
export function condPressureKPa(p: ChillerParams, c: ChillerState): number {
  return saturationPressureKPa(p.refrigerant, c.condSatC);
}

function trip(
  p: ChillerParams,
  c: ChillerState,
  env: ChillerEnv,
  sink: ChillerSink,
  alarm: string,
  fault: string,
): void {
  stop(p, c, env, sink, `tripped: ${alarm}`, "trip");
  c.alarmLatched = true;
  c.alarmText = alarm;
  sink.faults.push({ tS: env.tS, equipment: p.tag, text: fault });
  sink.events.push({ tS: env.tS, kind: "alarm", equipment: p.tag, message: `Latched alarm: ${alarm}` });
}

function stop(
  p: ChillerParams,
  c: ChillerState,
  env: ChillerEnv,
  sink: ChillerSink,
  why: string,
  reason: ChillerStopReason,
): void {
  if (!c.running) return;
  c.running = false;
  c.stopReason = reason;
  c.lowLiftS = 0;
  c.lastStopS = env.tS;
  c.lowLoadS = 0;
  sink.events.push({ tS: env.tS, kind: "state", equipment: p.tag, message: `Compressor stopped (${why})` });
}

/** Advance one chiller by env.dt seconds. Mutates `c` (a fresh copy owned by the caller). */
export function stepChiller(p: ChillerParams, c: ChillerState, env: ChillerEnv, sink: ChillerSink): void {
  const { tS, dt } = env;
  c.chwFlowLps = env.chwPumpOn ? p.chwDesignLps * c.chwFlowShare : 0;
  c.cwFlowLps = env.cwPumpOn ? p.cwDesignLps * c.cwFlowShare : 0;
  c.chwInC = env.chwInC;
  c.cwInC = env.cwInC;

  // Power: a sag drops the compressor drive on DC bus undervoltage (auto-reset once power is back).
  if (!env.powerOk) {
    if (c.running) {
      sink.faults.push({ tS, equipment: p.tag, text: "Drive DC bus undervoltage" });
      stop(p, c, env, sink, "drive fault: DC bus undervoltage", "safety");
      c.driveFaultText = "Drive DC bus undervoltage";
    }
    if (c.driveFaultText) c.driveFaultUntilS = tS + 10;
  }
  if (env.powerJustRestored && c.driveFaultText)
    sink.faults.push({ tS, equipment: p.tag, text: "Drive DC bus overvoltage warning (line restore)" });
  if (c.driveFaultText && tS >= c.driveFaultUntilS) {
    sink.events.push({ tS, kind: "state", equipment: p.tag, message: `Drive fault auto-reset (${c.driveFaultText})` });
    c.driveFaultText = "";
  }

  const condKPa = condPressureKPa(p, c);
  const evapKPa = evapPressureKPa(p, c);

  // A normal stop (not called, disabled) comes first: the plant stops a chiller before its pumps.
  const permissive = c.enabled && c.called && !c.alarmLatched && !c.driveFaultText && env.powerOk;
  if (c.running && !permissive)
    stop(p, c, env, sink, c.enabled ? "not called by the plant" : "disabled", c.enabled ? "schedule" : "manual");

  // Safeties while running.
  if (c.running) {
    const cwProven = c.cwFlowLps > flowSwitchShare * p.cwDesignLps;
    const chwProven = c.chwFlowLps > flowSwitchShare * p.chwDesignLps;
    c.cwFlowLowS = cwProven ? 0 : c.cwFlowLowS + dt;
    c.chwFlowLowS = chwProven ? 0 : c.chwFlowLowS + dt;
    c.lowEvapS = c.evapSatC < lowEvapTripC ? c.lowEvapS + dt : 0;
    c.lowLiftS = tS - c.lastStartS >= minLiftStartupS && condKPa - evapKPa < p.minLiftKPa ? c.lowLiftS + dt : 0;
    if (condKPa >= p.highCondTripKPa) {
      trip(
        p,
        c,
        env,
        sink,
        "High condenser pressure",
        `High discharge pressure trip at ${kpaAbsToPsig(condKPa).toFixed(1)} psig`,
      );
    } else if (c.driveC >= driveTripC) {
      trip(
        p,
        c,
        env,
        sink,
        "Drive over-temperature",
        `Drive over-temperature trip at ${((c.driveC * 9) / 5 + 32).toFixed(1)} °F`,
      );
    } else if (c.cwFlowLowS >= 10) {
      trip(p, c, env, sink, "Condenser water flow loss", "Condenser water flow switch open (low condenser water ΔP)");
    } else if (c.chwFlowLowS >= 10) {
      trip(
        p,
        c,
        env,
        sink,
        "Evaporator water flow loss",
        "Evaporator water flow switch open (low evaporator water ΔP)",
      );
    } else if (c.lowEvapS >= 30) {
      trip(
        p,
        c,
        env,
        sink,
        "Low evaporator pressure",
        `Low evaporator pressure trip at ${kpaAbsToPsig(evapKPa).toFixed(1)} psig`,
      );
    } else if (c.lowLiftS >= minLiftDelayS) {
      // An auto-reset safety: the controller restarts the compressor when its timers allow.
      const text = `Low lift: condenser − evaporator pressure difference ${((condKPa - evapKPa) / KPA_PER_PSI).toFixed(1)} psid below the ${(p.minLiftKPa / KPA_PER_PSI).toFixed(1)} psid minimum for ${minLiftDelayS} s`;
      sink.faults.push({ tS, equipment: p.tag, text });
      stop(p, c, env, sink, "low-lift safety", "safety");
    }
  } else {
    c.cwFlowLowS = 0;
    c.chwFlowLowS = 0;
    c.lowEvapS = 0;
  }

  // While stopped, the controller reports the reason that now holds it off (a latched trip wins).
  if (!c.running) {
    if (c.alarmLatched) c.stopReason = "trip";
    else if (!c.enabled) c.stopReason = "manual";
    else if (c.driveFaultText || !env.powerOk) c.stopReason = "safety";
    else if (!c.called) c.stopReason = "schedule";
    else if (c.stopReason === "trip" || c.stopReason === "manual" || c.stopReason === "running")
      c.stopReason = "schedule";
  }

  // Flow loss while running is left to the flow-proof safeties (they trip and latch); a start needs both flows proven.
  const flowsProven = c.chwFlowLps > flowSwitchShare * p.chwDesignLps && c.cwFlowLps > flowSwitchShare * p.cwDesignLps;
  if (
    !c.running &&
    permissive &&
    flowsProven &&
    restartInhibitLeftS(c, tS) <= 0 &&
    c.chwInC > c.setpointC + startDiffK
  ) {
    c.running = true;
    c.stopReason = "running";
    c.headLimitCeiling = 1;
    c.lastStartS = tS;
    c.loadCeiling = 0.2;
    c.lowLoadS = 0;
    sink.events.push({ tS, kind: "state", equipment: p.tag, message: "Compressor started" });
  }

  // Capacity: the controller holds leaving water at setpoint within the lift-limited capacity.
  const liftK = c.condSatC - c.evapSatC;
  // Liquid reaches the evaporator only as fast as the pressure difference pushes it through the expansion
  // device, and less of it is there after refrigerant has migrated to the condenser: a starved evaporator.
  const feedFrac = Math.sqrt(Math.min(1, Math.max(0, (condKPa - evapKPa) / fullFeedDpKPa))) * (1 - 0.8 * c.migration);
  const headFrac = condKPa / p.highCondTripKPa;
  if (c.running) {
    c.loadCeiling = Math.min(1, c.loadCeiling + softLoadPerS * dt);
    const plrNow = c.evapKW / p.ratedEvapKW;
    if (headFrac >= headUnloadFraction) {
      if (c.headLimitCeiling >= 1)
        sink.events.push({ tS, kind: "state", equipment: p.tag, message: "High condenser pressure limit: unloading" });
      c.headLimitCeiling = Math.max(
        minStableFraction(liftK, p.designLiftK),
        Math.min(c.headLimitCeiling, plrNow) - headUnloadPerS * dt,
      );
    } else if (headFrac >= headHoldFraction) {
      if (c.headLimitCeiling >= 1)
        sink.events.push({
          tS,
          kind: "state",
          equipment: p.tag,
          message: "High condenser pressure limit: holding capacity",
        });
      c.headLimitCeiling = Math.min(c.headLimitCeiling, Math.max(plrNow, minStableFraction(liftK, p.designLiftK)));
    } else if (headFrac < headReleaseFraction && c.headLimitCeiling < 1) {
      c.headLimitCeiling = Math.min(1, c.headLimitCeiling + headReloadPerS * dt);
    }
    const neededKW = c.chwFlowLps * cpW * (c.chwInC - c.setpointC);
    const ceiling = Math.min(c.loadCeiling, liftCapacityFraction(liftK, p.designLiftK), c.headLimitCeiling);
    const availKW = p.ratedEvapKW * ceiling;
    const minKW = p.ratedEvapKW * minCapacityFraction;
    // A starved evaporator cannot absorb even the minimum capacity.
    const targetKW = Math.min(Math.max(minKW, Math.min(neededKW, availKW)), p.ratedEvapKW * feedFrac);
    c.evapKW += (targetKW - c.evapKW) * (1 - Math.exp(-dt / 30));
    // Never pull the water below 1 °C above freezing-side limits: capacity cannot exceed what the water can give.
    c.evapKW = Math.min(c.evapKW, Math.max(0, c.chwFlowLps * cpW * (c.chwInC - 1)));
    c.lowLoadS =
      neededKW < minKW && c.chwInC - c.evapKW / (c.chwFlowLps * cpW) < c.setpointC - lowLoadStopK ? c.lowLoadS + dt : 0;
    if (c.lowLoadS >= 120) stop(p, c, env, sink, "low load: setpoint satisfied", "low_load");
  } else {
    c.evapKW = 0;
  }
  if (!c.running) c.evapKW = 0;
  c.chwOutC = c.chwFlowLps > 0 ? c.chwInC - c.evapKW / (c.chwFlowLps * cpW) : c.chwInC;

  // Compressor work from a Carnot-fraction cycle: COP = η(plr) · T_evap / lift (lift floored for the model).
  const plr = c.evapKW / p.ratedEvapKW;
  if (c.running) {
    const cop = (cycleEfficiency(plr) * (c.evapSatC + 273.15)) / Math.max(liftK, 10);
    c.compKW = c.evapKW / cop + fixedLossFraction * p.ratedInputKW;
  } else {
    c.compKW = 0;
  }
  // Heat rejected = heat absorbed + compressor work (motor and drive are refrigerant-cooled).
  c.condKW = c.evapKW + c.compKW;
  if (c.cwFlowLps > 0) {
    c.cwOutC = c.cwInC + c.condKW / (c.cwFlowLps * cpW);
  } else {
    // Stagnant condenser: the shell water soaks up the heat.
    c.cwOutC += (c.condKW * dt) / p.condShellKJPerK;
  }

  // Refrigerant saturation temperatures follow the water with the approaches, lagged by the shells' mass.
  let evapTarget: number;
  let condTarget: number;
  let tau: number;
  let evapTau: number;
  if (c.running) {
    // The compressor keeps drawing vapour: with too little liquid coming in, suction falls below the water.
    evapTarget =
      c.chwOutC - Math.max(0.2, p.evapApproachK * plr) - starvedSuctionDropK * (1 - feedFrac) * (c.speedPct / 100);
    condTarget =
      c.cwOutC + Math.max(0.2, p.condApproachK * c.condFouling * (c.condKW / (p.ratedEvapKW + p.ratedInputKW)));
    // After the loops have crossed, the refrigerant sits in the wrong shell and lift builds slowly.
    tau = 20 + 1200 * c.migration;
    evapTau = 20 + 120 * c.migration;
  } else {
    evapTarget = c.chwFlowLps > 0 ? c.chwInC : c.evapSatC + (env.roomC - c.evapSatC) * 0.0005 * dt;
    condTarget = c.cwFlowLps > 0 ? c.cwInC : c.cwOutC;
    tau = 180;
    evapTau = 180;
  }
  c.evapSatC += (evapTarget - c.evapSatC) * (1 - Math.exp(-dt / evapTau));
  c.condSatC += (condTarget - c.condSatC) * (1 - Math.exp(-dt / tau));
  c.cwInSensorC =
    c.cwFlowLps > 0 ? c.cwInC : c.cwInSensorC + (env.roomC - c.cwInSensorC) * (1 - Math.exp(-dt / deadLegTauS));

  const dpKPa = condPressureKPa(p, c) - evapPressureKPa(p, c);
  const inverted = c.evapSatC > c.condSatC + 0.3;
  if (inverted !== c.pressuresInverted) {
    c.pressuresInverted = inverted;
    sink.events.push({
      tS,
      kind: "state",
      equipment: p.tag,
      message: inverted
        ? "Refrigerant pressures inverted: evaporator above condenser (loops crossed), no motor/drive cooling feed"
        : "Refrigerant pressures normal again: condenser above evaporator",
    });
  }
  if (!c.running) {
    c.migration = inverted ? Math.min(1, c.migration + dt / 900) : Math.max(0, c.migration - dt / 1800);
  } else if (dpKPa > 70) {
    c.migration = Math.max(0, c.migration - dt / 300);
  }

  // Speed: enough head for the lift (head ∝ speed², fan laws) and enough flow for the load; IGVs trim flow.
  if (c.running) {
    const maxLiftK = p.designLiftK * 1.6;
    const sLift = 1.05 * Math.sqrt(Math.max(liftK, 0) / maxLiftK);
    const s = Math.min(1, Math.max(0.35, sLift, 0.4 + 0.5 * plr));
    const next = c.speedPct + (100 * s - c.speedPct) * (1 - Math.exp(-dt / 10));
    // The head-pressure limit holds speed where it is rather than chase the rising lift toward the cut-out.
    c.speedPct = headFrac >= headHoldFraction && c.speedPct > 0 ? Math.min(c.speedPct, next) : next;
    c.igvPct = Math.min(100, Math.max(5, (100 * plr) / Math.max(c.speedPct / 100, 0.3)));
  } else {
    c.speedPct = 0;
    c.igvPct = 0;
  }

  // Drive temperature: losses ∝ speed²; liquid refrigerant cools it only while condenser pressure
  // exceeds evaporator pressure (flow ∝ √ΔP through the feed orifice); a solenoid holds ~105 °F.
  const speed = c.speedPct / 100;
  const lossKW = c.running ? p.driveLossKW * (0.15 + 0.85 * speed * speed) : 0;
  const feed = Math.sqrt(Math.min(1, Math.max(0, dpKPa / fullCoolingDpKPa)));
  const coolantC = c.evapSatC + 3;
  // Sub-step the drive's fast thermal loop so long model steps stay stable.
  const n = Math.max(1, Math.ceil(dt / 1));
  const h = dt / n;
  for (let i = 0; i < n; i++) {
    let coolKW = 0;
    if (c.running) {
      c.coolingValve = Math.min(1, Math.max(0, 0.5 + (c.driveC - driveCoolingSetpointC) / driveCoolingBandK));
      coolKW = c.coolingValve * feed * ((3 * p.driveLossKW) / 30) * Math.max(0, c.driveC - coolantC);
    } else {
      c.coolingValve = 0;
    }
    const ambientKW = (p.driveLossKW / 150) * (c.driveC - env.roomC);
    c.driveC += ((lossKW - coolKW - ambientKW) * h) / p.driveHeatCapKJPerK;
  }
}
