// Cooling tower with one variable-speed fan drive (mode auto / off / hand, fault latch) and its basin.
import { counterflowEffectiveness } from "./params";
import type { FaultEntry, ModelEvent, PlantParams, TowerState } from "./state";
import { fToC, WATER_HEAT_CAPACITY_KJ_PER_LK as cpW } from "@/lib/plant/units";
import { towerTag } from "./layout";

/** Airflow through a tower with its fan off, fraction of design (natural draft; 2.5 %, about 10–15 % of design heat rejection at equal driving temperature difference — recalled, not verified; condenser water still passes 100 °F with the fan off under load, as observed on the service call). */
export const naturalDraftAirFraction = 0.025;
/** Fan minimum speed in auto, fraction (common practice 15–25 %). */
const fanMinSpeed = 0.2;
/** Condenser water setpoint reset: wet bulb + 7 °F, limited to 65…85 °F (common practice). */
export function condenserWaterSetpointC(wetBulbC: number): number {
  return Math.min(fToC(85), Math.max(fToC(65), wetBulbC + (7 * 5) / 9));
}

export interface TowerEnv {
  tS: number;
  dt: number;
  inC: number;
  basinC: number;
  flowLps: number;
  wetBulbC: number;
  powerOk: boolean;
}

/** Leaving water of the fill: ε-NTU with water and air capacity rates; UA scales with airflow^0.6 and water flow^0.4 (Braun-type tower model). */
export function towerLeavingC(p: PlantParams, inC: number, flowLps: number, airFrac: number, wetBulbC: number): number {
  if (flowLps <= 0) return inC;
  const cw = flowLps * cpW;
  const ca = p.towerDesignAirCap * airFrac;
  const ua = p.towerDesignUA * Math.pow(airFrac, 0.6) * Math.pow(flowLps / p.towerDesignFlowLps, 0.4);
  const cmin = Math.min(cw, ca);
  const cmax = Math.max(cw, ca);
  const eps = counterflowEffectiveness(ua / cmin, cmin / cmax);
  const q = eps * cmin * (inC - wetBulbC);
  // Water cannot be cooled below freezing; basins are heated (common practice) — floor at 34 °F.
  return Math.max(inC - q / cw, Math.min(inC, fToC(34)));
}

export function stepTower(
  p: PlantParams,
  t: TowerState,
  env: TowerEnv,
  sink: { events: ModelEvent[]; faults: FaultEntry[] },
): void {
  const { tS, dt } = env;
  t.setpointC = condenserWaterSetpointC(env.wetBulbC);

  // Power loss faults the fan drive; when control power returns it reboots in OFF with its fault history gone.
  if (!env.powerOk) {
    if (!t.fault) {
      t.fault = true;
      t.faultText = "DC bus undervoltage";
      sink.faults.push({ tS, equipment: towerTag, text: "Fan drive fault: DC bus undervoltage" });
    }
    t.rebootAtS = tS + 3;
  } else if (t.rebootAtS !== null && tS >= t.rebootAtS) {
    t.rebootAtS = null;
    t.fault = false;
    t.faultText = "none";
    t.mode = "off";
    t.integral = 0;
    sink.events.push({
      tS,
      kind: "state",
      equipment: towerTag,
      message: "Fan drive restarted after power loss in OFF; fault no longer shown",
    });
  }

  let target = 0;
  if (!t.fault && env.powerOk) {
    if (t.mode === "hand") target = Math.min(1, t.handHz / 60);
    else if (t.mode === "auto") {
      // PI on the tower leaving water (the condenser water to the chillers).
      const e = env.basinC - t.setpointC;
      const kp = 0.25;
      t.integral = Math.min(1, Math.max(-0.3, t.integral + (kp * e * dt) / 240));
      const u = kp * e + t.integral;
      target = u < fanMinSpeed * 0.75 ? 0 : Math.min(1, Math.max(fanMinSpeed, u));
    }
  }
  if (t.mode !== "auto") t.integral = 0;
  // Drive acceleration limit: 0 → 60 Hz in about 20 s.
  const maxChange = dt / 20;
  t.speedFrac += Math.max(-maxChange, Math.min(maxChange, target - t.speedFrac));
  if (t.speedFrac < 1e-4) t.speedFrac = 0;

  t.inC = env.inC;
  t.flowLps = env.flowLps;
  const airFrac = Math.max(naturalDraftAirFraction, t.speedFrac);
  // Water the bypass valve sends past the fill falls straight to the basin, uncooled.
  const bypass = p.towerBypass ? Math.min(1, Math.max(0, t.bypassPct / 100)) : 0;
  const fillFlow = env.flowLps * (1 - bypass);
  const fillOutC = towerLeavingC(p, env.inC, fillFlow, airFrac, env.wetBulbC);
  t.outC = env.flowLps > 0 ? (fillFlow * fillOutC + (env.flowLps - fillFlow) * env.inC) / env.flowLps : env.inC;
  t.rejectKW = env.flowLps * cpW * (env.inC - t.outC);
}
