// Constant model parameters derived from a site layout.
import { plantTons, type SiteLayout } from "./layout";
import type { ChillerParams, PlantParams } from "./state";
import { saturationPressureKPa, saturationTempC } from "@/lib/refrigerant";
import { chillerLimitDefaults } from "@/lib/plant/equipment-limits";
import {
  deltaFToDeltaK,
  fToC,
  galToL,
  gpmToLps,
  KPA_PER_PSI,
  KW_PER_TON,
  psigToKpaAbs,
  WATER_HEAT_CAPACITY_KJ_PER_LK as cpW,
} from "@/lib/plant/units";

/** Evaporator and condenser refrigerant approaches at full load: 1.5 °F and 2 °F (common practice for modern centrifugal chillers). */
export const evapApproachDesignF = 1.5;
export const condApproachDesignF = 2.0;
/** Full-load input of a variable-speed centrifugal, kW/ton — used only to size the drive (ASHRAE 90.1 full-load limit is 0.56, REFERENCES.md §4). */
const sizingKWPerTon = 0.55;
/** Drive losses ≈ 3 % of input power (recalled, not verified: 97 % drive efficiency). */
const driveLossFraction = 0.03;
/** Heat-up rate of an uncooled drive at full speed, K/min: sets the drive's heat capacity (calibrated to trip in ~5 min). */
const uncooledDriveRiseKPerMin = 7;
/** Water-side pressure drops at design flow, psid (common practice, recalled: 5–10 psid). */
const evapDpDesignPsid = 8;
const condDpDesignPsid = 7;
/** Water held in a condenser shell, gal/ton (recalled, not verified). */
const condShellGalPerTon = 1;
/** Tower: design water/air capacity ratio (common practice: L/G around 1, assumed 0.8 here). */
const towerWaterToAirCapRatio = 0.8;
/** Mechanical room temperature, where an idle drive settles: 85 °F (assumed). */
const mechanicalRoomF = 85;

export function chillerParamsOf(layout: SiteLayout): ChillerParams[] {
  const d = layout.design;
  return layout.chillers.map((c) => {
    const ratedEvapKW = c.capacityTons * KW_PER_TON;
    const ratedInputKW = c.capacityTons * sizingKWPerTon;
    const chwDesignLps = gpmToLps(d.chwGpmPerTon * c.capacityTons);
    const cwDesignLps = gpmToLps(d.cwGpmPerTon * c.capacityTons);
    const cwRangeK = (ratedEvapKW + ratedInputKW) / (cwDesignLps * cpW);
    const designLiftK =
      fToC(d.cwEnteringF) +
      cwRangeK +
      deltaFToDeltaK(condApproachDesignF) -
      (fToC(d.chwSupplyF) - deltaFToDeltaK(evapApproachDesignF));
    const driveLossKW = driveLossFraction * ratedInputKW;
    return {
      tag: c.tag,
      refrigerant: c.refrigerant,
      ratedEvapKW,
      ratedInputKW,
      chwDesignLps,
      cwDesignLps,
      evapDpDesignKPa: evapDpDesignPsid * KPA_PER_PSI,
      condDpDesignKPa: condDpDesignPsid * KPA_PER_PSI,
      designLiftK,
      evapApproachK: deltaFToDeltaK(evapApproachDesignF),
      condApproachK: deltaFToDeltaK(condApproachDesignF),
      driveLossKW,
      driveHeatCapKJPerK: (driveLossKW * 0.85 * 60) / uncooledDriveRiseKPerMin,
      // The cut-out is set per refrigerant at the condensing temperature R-134a has at the layout's psig setting.
      highCondTripKPa: saturationPressureKPa(
        c.refrigerant,
        saturationTempC("R-134a", psigToKpaAbs(layout.highCondPressureTripPsig)),
      ),
      condShellKJPerK: galToL(condShellGalPerTon * c.capacityTons) * cpW,
      // The simulated compressors are variable-speed oil-free centrifugals with refrigerant-cooled motor and drive.
      minLiftKPa: chillerLimitDefaults(c.refrigerant, "centrifugal_vsd_oil_free").minStartLiftKPa.value,
    };
  });
}

/** Counterflow heat-exchanger effectiveness (ε-NTU; Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, Table 11.3). */
export function counterflowEffectiveness(ntu: number, cr: number): number {
  if (ntu <= 0) return 0;
  if (Math.abs(1 - cr) < 1e-6) return ntu / (1 + ntu);
  const e = Math.exp(-ntu * (1 - cr));
  return (1 - e) / (1 - cr * e);
}

export function plantParamsOf(layout: SiteLayout): PlantParams {
  const chillers = chillerParamsOf(layout);
  const d = layout.design;
  const towerDesignFlowLps = chillers.reduce((s, c) => s + c.cwDesignLps, 0);
  const cw = towerDesignFlowLps * cpW;
  const rejectKW = chillers.reduce((s, c) => s + c.ratedEvapKW + c.ratedInputKW, 0);
  const rangeK = rejectKW / cw;
  const inC = fToC(d.cwEnteringF) + rangeK;
  const wbC = fToC(d.cwEnteringF - d.towerApproachF); // design wet bulb: 85 − 7 = 78 °F
  // Tower design point: leaving water = design wet bulb + design approach at full heat rejection.
  const targetEps = rangeK / (inC - wbC);
  const cr = towerWaterToAirCapRatio;
  let lo = 0.01;
  let hi = 20;
  for (let i = 0; i < 60; i++) {
    const mid = (lo + hi) / 2;
    if (counterflowEffectiveness(mid, cr) < targetEps) lo = mid;
    else hi = mid;
  }
  const ntu = (lo + hi) / 2;
  const peakKW = plantTons(layout) * KW_PER_TON * d.peakLoadFraction;
  const ahuDesignKW = Array.from({ length: layout.airHandlers }, () => peakKW / layout.airHandlers);
  return {
    chillers,
    ahuDesignKW,
    chwLoopL: galToL(layout.chwLoopGalPerTon * plantTons(layout)),
    cwLoopL: galToL(layout.cwLoopGalPerTon * plantTons(layout)),
    towerDesignFlowLps,
    towerDesignUA: ntu * cw,
    towerDesignAirCap: cw / cr,
    roomC: fToC(mechanicalRoomF),
    towerBypass: layout.towerBypass,
  };
}
