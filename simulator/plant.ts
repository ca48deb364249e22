// The plant model: step(state, inputs, dt) → next state and what happened. Pure and deterministic:
// all randomness comes from the seeded generator whose state lives in PlantState.
import { wetBulbC } from "@/lib/psychrometrics";
import { applyDrillAction, drillEvent } from "./actions";
import { timerLimits } from "./actions-schema";
import { stepChiller, liftCapacityFraction } from "./chiller";
import { chwPumpTag, cwPumpTag, type SiteLayout } from "./layout";
import { plantParamsOf } from "./params";
import { Rng, seedState } from "./prng";
import type {
  ChillerState,
  FaultEntry,
  ModelEvent,
  PlantCommand,
  PlantState,
  PumpState,
  StepInputs,
  StepResult,
} from "./state";
import { stepTower, condenserWaterSetpointC } from "./tower";
import { fToC, WATER_HEAT_CAPACITY_KJ_PER_LK as cpW } from "@/lib/plant/units";

/** Wet bulb is recomputed once a simulated minute (weather changes slowly; PsychroLib iterates). */
const weatherRefreshS = 60;
/** Staging: add a chiller after 10 min with the running ones at ≥ 95 % and supply 1 °F high; drop one after 15 min below 60 % of one fewer (common practice). */
const stageUpDelayS = 600;
const stageDownDelayS = 900;
const faultLogLength = 100;

function exp1(dt: number, tau: number): number {
  return 1 - Math.exp(-dt / tau);
}

export interface InitialConditions {
  chwSetpointC?: number;
  disabledChillers?: string[];
  fanMode?: "auto" | "off" | "hand";
  handHz?: number;
}

export function initialState(
  layout: SiteLayout,
  seed: number,
  inputs: StepInputs,
  init: InitialConditions = {},
): PlantState {
  const params = plantParamsOf(layout);
  const sp = init.chwSetpointC ?? fToC(layout.design.chwSupplyF);
  const wb = wetBulbC(inputs.dryBulbC, inputs.rhPct);
  const cwSp = condenserWaterSetpointC(wb);
  const chillers: ChillerState[] = params.chillers.map((p) => ({
    enabled: !(init.disabledChillers ?? []).includes(p.tag),
    called: false,
    running: false,
    alarmLatched: false,
    alarmText: "",
    driveFaultUntilS: -1,
    driveFaultText: "",
    lastStartS: -1e6,
    lastStopS: -1e6,
    startToStartS: timerLimits["start-to-start"].default,
    stopToStartS: timerLimits["stop-to-start"].default,
    lowLoadS: 0,
    chwFlowLps: 0,
    cwFlowLps: 0,
    chwInC: sp + 2,
    chwOutC: sp + 2,
    cwInC: cwSp,
    cwOutC: cwSp,
    setpointC: sp,
    evapKW: 0,
    compKW: 0,
    condKW: 0,
    loadCeiling: 0,
    evapSatC: sp,
    condSatC: cwSp,
    speedPct: 0,
    igvPct: 0,
    driveC: params.roomC,
    coolingValve: 0,
    migration: 0,
    pressuresInverted: false,
    condFouling: 1,
    chwFlowShare: 1,
    cwFlowShare: 1,
    cwFlowLowS: 0,
    chwFlowLowS: 0,
    lowEvapS: 0,
    stopReason: "schedule",
    lowLiftS: 0,
    headLimitCeiling: 1,
    cwInSensorC: cwSp,
  }));
  return {
    tS: 0,
    rng: seedState(seed),
    params,
    dryBulbC: inputs.dryBulbC,
    rhPct: inputs.rhPct,
    wetBulbC: wb,
    weatherNextS: weatherRefreshS,
    coilAirC: inputs.coilAirC,
    chwSupplyC: sp + 1,
    chwReturnC: sp + 3,
    basinC: cwSp,
    chillers,
    tower: {
      mode: init.fanMode ?? "auto",
      handHz: init.handHz ?? 60,
      fault: false,
      faultText: "none",
      rebootAtS: null,
      speedFrac: 0,
      integral: 0,
      setpointC: cwSp,
      inC: cwSp,
      outC: cwSp,
      flowLps: 0,
      rejectKW: 0,
      bypassPct: 0,
    },
    chwPumps: params.chillers.map(() => ({ commanded: false, running: false, tripped: false, speedPct: 0 })),
    cwPumps: params.chillers.map(() => ({ commanded: false, running: false, tripped: false, speedPct: 0 })),
    ahus: params.ahuDesignKW.map(() => ({
      override: "auto" as const,
      running: false,
      demandKW: 0,
      loadKW: 0,
      valvePct: 0,
      noise: 1,
    })),
    stageCount: 1,
    stageUpS: 0,
    stageDownS: 0,
    powerDownUntilS: -1,
    powerRestoreHandled: true,
    faultLog: [],
  };
}

function applyCommand(s: PlantState, cmd: PlantCommand, events: ModelEvent[]): void {
  const tS = s.tS;
  switch (cmd.kind) {
    case "drill": {
      const outcome = applyDrillAction(s, cmd.action);
      events.push(drillEvent(tS, cmd.action, outcome, cmd.source === "scenario" ? "Scenario" : "Operator"));
      return;
    }
    case "power-blip":
      s.powerDownUntilS = tS + cmd.durationS;
      s.powerRestoreHandled = false;
      events.push({ tS, kind: "scenario", equipment: null, message: `Utility power sag/blip (${cmd.durationS} s)` });
      return;
    case "pump-trip":
    case "pump-reset": {
      const trip = cmd.kind === "pump-trip";
      const ci = s.params.chillers.findIndex((_, i) => chwPumpTag(i) === cmd.equipment);
      const wi = s.params.chillers.findIndex((_, i) => cwPumpTag(i) === cmd.equipment);
      if (ci >= 0) s.chwPumps = s.chwPumps.map((p, i) => (i === ci ? { ...p, tripped: trip } : p));
      if (wi >= 0) s.cwPumps = s.cwPumps.map((p, i) => (i === wi ? { ...p, tripped: trip } : p));
      events.push({
        tS,
        kind: trip ? "fault" : "scenario",
        equipment: cmd.equipment,
        message: trip ? `Pump tripped: ${cmd.reason}` : "Pump overload reset",
      });
      return;
    }
    case "condenser-fouling": {
      const i = s.params.chillers.findIndex((c) => c.tag === cmd.equipment);
      if (i >= 0) s.chillers = s.chillers.map((c, j) => (j === i ? { ...c, condFouling: cmd.factor } : c));
      return;
    }
    case "flow-restriction": {
      const i = s.params.chillers.findIndex((c) => c.tag === cmd.equipment);
      if (i < 0) return;
      const share = Math.min(1, Math.max(0, cmd.share));
      const key = cmd.loop === "chilled_water" ? "chwFlowShare" : "cwFlowShare";
      s.chillers = s.chillers.map((c, j) => (j === i ? { ...c, [key]: share } : c));
      events.push({
        tS,
        kind: share < 1 ? "fault" : "scenario",
        equipment: cmd.equipment,
        message: `${cmd.reason}: ${cmd.loop === "chilled_water" ? "chilled" : "condenser"} water flow ${Math.round(share * 100)} % of design with the pump running`,
      });
      return;
    }
    case "note":
      events.push({ tS, kind: "scenario", equipment: null, message: cmd.message });
      return;
  }
}

/** Which chillers the plant calls: the first `stageCount` enabled ones, plus a standby for any that is alarmed. */
function stage(s: PlantState, dt: number): void {
  const enabled = s.chillers.map((c, i) => (c.enabled ? i : -1)).filter((i) => i >= 0);
  const running = s.chillers.filter((c) => c.running);
  const sp = s.chillers[0]?.setpointC ?? fToC(44);
  const allLoaded =
    running.length > 0 &&
    running.every((c, k) => {
      const i = s.chillers.indexOf(running[k]);
      const p = s.params.chillers[i];
      return (
        c.evapKW >=
        0.95 * p.ratedEvapKW * Math.min(c.loadCeiling, liftCapacityFraction(c.condSatC - c.evapSatC, p.designLiftK))
      );
    });
  s.stageUpS = allLoaded && s.chwSupplyC > sp + 0.56 && s.stageCount < enabled.length ? s.stageUpS + dt : 0;
  if (s.stageUpS >= stageUpDelayS) {
    s.stageCount += 1;
    s.stageUpS = 0;
  }
  const totalKW = running.reduce((a, c) => a + c.evapKW, 0);
  const calledIdx = enabled.slice(0, s.stageCount);
  const fewerCap = calledIdx.slice(0, -1).reduce((a, i) => a + s.params.chillers[i].ratedEvapKW, 0);
  s.stageDownS = s.stageCount > 1 && totalKW < 0.6 * fewerCap ? s.stageDownS + dt : 0;
  if (s.stageDownS >= stageDownDelayS) {
    s.stageCount -= 1;
    s.stageDownS = 0;
  }
  s.stageCount = Math.max(1, Math.min(s.stageCount, Math.max(1, enabled.length)));
  const called = new Set(enabled.slice(0, s.stageCount));
  // A tripped chiller keeps its pumps; the next enabled, healthy chiller is called in as standby.
  for (const i of [...called]) {
    if (s.chillers[i].alarmLatched) {
      const standby = enabled.find((j) => !called.has(j) && !s.chillers[j].alarmLatched);
      if (standby !== undefined) called.add(standby);
    }
  }
  s.chillers = s.chillers.map((c, i) => (c.called === called.has(i) ? c : { ...c, called: called.has(i) }));
}

export function step(state: PlantState, inputs: StepInputs, dt: number): StepResult {
  const s: PlantState = { ...state };
  const events: ModelEvent[] = [];
  const faults: FaultEntry[] = [];
  const rng = new Rng(s.rng);
  const p = s.params;

  for (const cmd of inputs.commands) applyCommand(s, cmd, events);

  // Weather.
  s.dryBulbC = inputs.dryBulbC;
  s.rhPct = inputs.rhPct;
  s.coilAirC = inputs.coilAirC;
  if (s.tS >= s.weatherNextS) {
    s.wetBulbC = wetBulbC(inputs.dryBulbC, inputs.rhPct);
    s.weatherNextS = s.tS + weatherRefreshS;
  }

  const powerOk = s.tS >= s.powerDownUntilS;
  const powerJustRestored = powerOk && !s.powerRestoreHandled;
  if (powerJustRestored) {
    s.powerRestoreHandled = true;
    events.push({ tS: s.tS, kind: "scenario", equipment: null, message: "Utility power restored" });
  }

  stage(s, dt);
  // The plant commands a chiller's pumps with the chiller; a tripped overload keeps a commanded pump stopped.
  const drivePump = (pm: PumpState, i: number): PumpState => {
    const commanded = s.chillers[i].called;
    const run = commanded && !pm.tripped;
    return run === pm.running && commanded === pm.commanded
      ? pm
      : { ...pm, commanded, running: run, speedPct: run ? 100 : 0 };
  };
  s.chwPumps = s.chwPumps.map(drivePump);
  s.cwPumps = s.cwPumps.map(drivePump);

  // Chillers, fed by the chilled-water return header and the tower basin.
  const sink = { events, faults };
  s.chillers = s.chillers.map((c0, i) => {
    const c = { ...c0 };
    stepChiller(
      p.chillers[i],
      c,
      {
        tS: s.tS,
        dt,
        chwInC: s.chwReturnC,
        cwInC: s.basinC,
        chwPumpOn: s.chwPumps[i].running,
        cwPumpOn: s.cwPumps[i].running,
        powerOk,
        powerJustRestored,
        roomC: p.roomC,
      },
      sink,
    );
    return c;
  });

  // Chilled-water loop: chillers' mixed leaving water → supply volume → air-handler coils → return volume.
  let flow = 0;
  let mixed = 0;
  for (const c of s.chillers) {
    flow += c.chwFlowLps;
    mixed += c.chwFlowLps * c.chwOutC;
  }
  let ahuKW = 0;
  s.ahus = s.ahus.map((a0, i) => {
    const a = { ...a0 };
    // Demand wanders slowly around the schedule (Ornstein–Uhlenbeck, σ ≈ 3 %, τ = 10 min).
    a.noise += (1 - a.noise) * exp1(dt, 600) + 0.03 * Math.sqrt((2 * dt) / 600) * rng.normal();
    const scheduled = i < inputs.ahusScheduled;
    a.running = a.override === "on" || (a.override === "auto" && scheduled);
    a.demandKW = a.running ? Math.max(0, p.ahuDesignKW[i] * inputs.loadFraction * a.noise) : 0;
    // Coil capacity falls as the supply water warms toward the air entering the coil.
    const designSpan = inputs.coilAirC - fToC(44);
    const capKW =
      flow > 0 ? (p.ahuDesignKW[i] * 1.1 * Math.max(0, inputs.coilAirC - s.chwSupplyC)) / Math.max(designSpan, 1) : 0;
    a.loadKW = Math.min(a.demandKW, capKW);
    a.valvePct = !a.running || a.demandKW <= 0 ? 0 : capKW <= 0 ? 100 : Math.min(100, (100 * a.demandKW) / capKW);
    ahuKW += a.loadKW;
    return a;
  });
  if (flow > 0) {
    const vol = p.chwLoopL / 2;
    s.chwSupplyC += (mixed / flow - s.chwSupplyC) * exp1(dt, vol / flow);
    const coilOut = s.chwSupplyC + ahuKW / (flow * cpW);
    s.chwReturnC += (coilOut - s.chwReturnC) * exp1(dt, vol / flow);
  } else {
    // No circulation: the coils and pipes drift slowly toward the air around them.
    s.chwSupplyC += (inputs.coilAirC - s.chwSupplyC) * exp1(dt, 6 * 3600);
    s.chwReturnC += (inputs.coilAirC - s.chwReturnC) * exp1(dt, 3 * 3600);
  }

  // Condenser loop: chillers' mixed leaving water → tower fill → basin → condenser pumps.
  let cwFlow = 0;
  let cwMixed = 0;
  for (const c of s.chillers) {
    cwFlow += c.cwFlowLps;
    cwMixed += c.cwFlowLps * c.cwOutC;
  }
  const towerIn = cwFlow > 0 ? cwMixed / cwFlow : s.tower.inC;
  const tower = { ...s.tower };
  stepTower(
    p,
    tower,
    { tS: s.tS, dt, inC: towerIn, basinC: s.basinC, flowLps: cwFlow, wetBulbC: s.wetBulbC, powerOk },
    sink,
  );
  s.tower = tower;
  if (cwFlow > 0) s.basinC += (tower.outC - s.basinC) * exp1(dt, p.cwLoopL / cwFlow);
  else s.basinC += (Math.max(s.wetBulbC + 2, fToC(34)) - s.basinC) * exp1(dt, 4 * 3600);

  if (faults.length > 0) {
    s.faultLog = [...s.faultLog, ...faults].slice(-faultLogLength);
    for (const f of faults) events.push({ tS: f.tS, kind: "fault", equipment: f.equipment, message: f.text });
  }
  s.rng = rng.state;
  s.tS = state.tS + dt;
  return { state: s, events };
}
