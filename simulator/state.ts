// The plant state: everything the model carries from one step to the next (SI units throughout).
import type { ChillerStopReason, FanDriveMode } from "@/lib/quantities";
import type { Refrigerant } from "@/lib/refrigerant";
import type { DrillAction } from "./actions-schema";

export interface FaultEntry {
  tS: number;
  equipment: string;
  text: string;
}

export type ModelEventKind = "scenario" | "fault" | "alarm" | "state" | "action" | "action-refused";

export interface ModelEvent {
  tS: number;
  kind: ModelEventKind;
  equipment: string | null;
  message: string;
}

/** Constant per-chiller parameters derived from the layout (shared by reference, never mutated). */
export interface ChillerParams {
  tag: string;
  refrigerant: Refrigerant;
  ratedEvapKW: number;
  ratedInputKW: number;
  chwDesignLps: number;
  cwDesignLps: number;
  evapDpDesignKPa: number;
  condDpDesignKPa: number;
  designLiftK: number;
  evapApproachK: number;
  condApproachK: number;
  driveLossKW: number;
  driveHeatCapKJPerK: number;
  highCondTripKPa: number;
  /** Water held in the condenser shell, for a stagnant-condenser heat-up when flow is lost. */
  condShellKJPerK: number;
  /** Minimum condenser − evaporator pressure difference the low-lift safety holds, kPa. */
  minLiftKPa: number;
}

export interface ChillerState {
  enabled: boolean;
  called: boolean;
  running: boolean;
  alarmLatched: boolean;
  alarmText: string;
  driveFaultUntilS: number;
  driveFaultText: string;
  lastStartS: number;
  lastStopS: number;
  startToStartS: number;
  stopToStartS: number;
  lowLoadS: number;
  chwFlowLps: number;
  cwFlowLps: number;
  chwInC: number;
  chwOutC: number;
  cwInC: number;
  cwOutC: number;
  setpointC: number;
  evapKW: number;
  compKW: number;
  condKW: number;
  /** Soft-load ceiling after a start, fraction of rated capacity. */
  loadCeiling: number;
  evapSatC: number;
  condSatC: number;
  speedPct: number;
  igvPct: number;
  driveC: number;
  coolingValve: number;
  /** 0…1: how far refrigerant has migrated to the colder shell while the loops were inverted. */
  migration: number;
  pressuresInverted: boolean;
  condFouling: number;
  /** Share of design flow through each barrel while its pump runs (a clogging strainer or part-shut valve lowers it). */
  chwFlowShare: number;
  cwFlowShare: number;
  cwFlowLowS: number;
  chwFlowLowS: number;
  lowEvapS: number;
  /** Why the compressor is not running, as the controller reports it ("running" while it runs). */
  stopReason: ChillerStopReason;
  /** Seconds the pressure difference has been below the minimum lift while running. */
  lowLiftS: number;
  /** Capacity ceiling the high-condenser-pressure limit holds or lowers, fraction of rated (1 = no limit). */
  headLimitCeiling: number;
  /** What the entering-condenser-water sensor reads: the basin with flow, a dead leg drifting to the room without. */
  cwInSensorC: number;
}

export interface TowerState {
  mode: FanDriveMode;
  handHz: number;
  fault: boolean;
  faultText: string;
  rebootAtS: number | null;
  speedFrac: number;
  integral: number;
  setpointC: number;
  inC: number;
  outC: number;
  flowLps: number;
  rejectKW: number;
  /** Tower bypass valve, % of the condenser water sent past the fill to the basin (0 where none is fitted). */
  bypassPct: number;
}

export interface PumpState {
  /** The plant's start/stop command to the pump. */
  commanded: boolean;
  running: boolean;
  tripped: boolean;
  speedPct: number;
}

export type AhuOverride = "auto" | "on" | "off";

export interface AhuState {
  override: AhuOverride;
  running: boolean;
  demandKW: number;
  loadKW: number;
  valvePct: number;
  /** Slow random multiplier on demand (occupants, solar), mean 1. */
  noise: number;
}

export interface PlantParams {
  chillers: ChillerParams[];
  ahuDesignKW: number[];
  chwLoopL: number;
  cwLoopL: number;
  towerDesignFlowLps: number;
  towerDesignUA: number;
  towerDesignAirCap: number;
  roomC: number;
  towerBypass: boolean;
}

export interface PlantState {
  tS: number;
  rng: number;
  params: PlantParams;
  dryBulbC: number;
  rhPct: number;
  wetBulbC: number;
  weatherNextS: number;
  coilAirC: number;
  chwSupplyC: number;
  chwReturnC: number;
  basinC: number;
  chillers: ChillerState[];
  tower: TowerState;
  chwPumps: PumpState[];
  cwPumps: PumpState[];
  ahus: AhuState[];
  stageCount: number;
  stageUpS: number;
  stageDownS: number;
  powerDownUntilS: number;
  powerRestoreHandled: boolean;
  faultLog: readonly FaultEntry[];
}

/** Everything from outside the plant for one step: weather, building demand, and commands. */
export interface StepInputs {
  dryBulbC: number;
  rhPct: number;
  /** Building cooling demand as a fraction of each air handler's design load. */
  loadFraction: number;
  /** How many air handlers (AHU-1 first) the building schedule runs. */
  ahusScheduled: number;
  /** Air entering the coils (mixed air), °C. */
  coilAirC: number;
  commands: PlantCommand[];
}

export type PlantCommand =
  | { kind: "drill"; action: DrillAction; source: "scenario" | "operator" }
  | { kind: "power-blip"; durationS: number }
  | { kind: "pump-trip"; equipment: string; reason: string }
  | { kind: "pump-reset"; equipment: string }
  | { kind: "condenser-fouling"; equipment: string; factor: number }
  | {
      kind: "flow-restriction";
      equipment: string;
      loop: "chilled_water" | "condenser_water";
      /** Share of design flow left with the pump running, 0…1. */
      share: number;
      reason: string;
    }
  | { kind: "note"; message: string };

export interface StepResult {
  state: PlantState;
  events: ModelEvent[];
}
