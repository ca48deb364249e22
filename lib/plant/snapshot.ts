// A site's derived numbers from the latest value of each point: what the site page shows
// and what the rules reason with. Pure: the caller passes the latest values and event time.

import type { QuantityKey } from "@/lib/quantities";
import {
  crossoverMarginK,
  crossoverPressureMarginKPa,
  timeToCrossover,
  type TimeToCrossoverOptions,
  type TimeToCrossoverResult,
} from "./crossover";
import { cop, kwPerTon } from "./efficiency";
import { restartLockoutLeft, type LockoutLeft } from "./lockout";
import { condenserApproachK, evaporatorApproachK, liftK, pressureLiftKPa } from "./refrigerant-side";
import {
  booleanAt,
  equipmentOfKind,
  servingEquipment,
  towersServing,
  type Equipment,
  type LatestValues,
  type Site,
} from "./site";
import { towerApproachK, towerRangeK } from "./tower";
import type { TimedValue } from "./trend";
import { kwToTons } from "./units";
import { asRefrigerant } from "./equipment-limits";
import { saturationTempC } from "@/lib/refrigerant";
import { wetBulbC as psychrometricWetBulbC } from "@/lib/psychrometrics";
import { condenserDeltaTK, effectiveFlowLps, evaporatorDeltaTK, waterLoadKw } from "./water-side";

export interface ChillerSnapshot {
  tag: string;
  running: boolean | null;
  evaporatorDeltaTK: number | null;
  condenserDeltaTK: number | null;
  chilledWaterFlowLps: number | null;
  flowSource: "measured" | "design" | null;
  loadKw: number | null;
  loadTons: number | null;
  /** Load as a fraction of nameplate tons. */
  loadFraction: number | null;
  compressorPowerKw: number | null;
  kwPerTon: number | null;
  cop: number | null;
  liftK: number | null;
  pressureLiftKPa: number | null;
  condenserApproachK: number | null;
  evaporatorApproachK: number | null;
  /** Condenser water minus chilled water, both entering the chiller. */
  crossoverMarginK: number | null;
  /** Condenser − evaporator refrigerant pressure: running, the lift; stopped, the shells' own reading of the crossover. */
  crossoverPressureMarginKPa: number | null;
  /** What the projections fit: the shells' saturated-temperature difference when both pressures are read, else the water margin. */
  marginBasis: "refrigerant" | "water" | null;
  /** The projections' target (K): the margin the chiller needs to start, from its record's minimum pressure difference. */
  startMarginK: number | null;
  /** Fit over the short window (margin above `startMarginK`): follows fast changes such as a trip. */
  timeToCrossover: TimeToCrossoverResult | null;
  /** Fit over the long window: sees a slow drift the short window takes for noise. */
  slowTimeToCrossover: TimeToCrossoverResult | null;
  lockout: LockoutLeft;
  /** Event time of the oldest and newest reading these numbers rest on. */
  inputsFromMs: number | null;
  inputsToMs: number | null;
}

export interface TowerSnapshot {
  tag: string;
  rangeK: number | null;
  approachK: number | null;
  fanDriveMode: string | null;
  fanRunning: boolean | null;
  inputsFromMs: number | null;
  inputsToMs: number | null;
}

export interface SiteSnapshot {
  atMs: number;
  chillers: ChillerSnapshot[];
  towers: TowerSnapshot[];
  wetBulbC: number | null;
}

/** Per-chiller history the latest values cannot give: margin samples and run edges. */
export interface ChillerHistoryInputs {
  marginSamples?: readonly TimedValue[];
  slowMarginSamples?: readonly TimedValue[];
  lastStartMs?: number | null;
  lastStopMs?: number | null;
  marginBasis?: "refrigerant" | "water" | null;
  startMarginK?: number | null;
}

export interface SnapshotOptions {
  history?: Record<string, ChillerHistoryInputs>;
  timeToCrossover?: Partial<TimeToCrossoverOptions>;
  slowTimeToCrossover?: Partial<TimeToCrossoverOptions>;
  /** Anti-recycle timer settings to assume for a chiller whose controller does not report them (its record's). */
  fallbackTimers?: (chiller: Equipment) => { startToStartS: number; stopToStartS: number } | null;
}

/** Reads points and remembers the event times of those it used. */
class InputReader {
  fromMs: number | null = null;
  toMs: number | null = null;
  constructor(
    private readonly latest: LatestValues,
    private readonly tag: string,
  ) {}
  num(q: QuantityKey, tag = this.tag): number | null {
    const p = this.latest[tag]?.[q];
    if (!p || typeof p.value !== "number" || !Number.isFinite(p.value)) return null;
    this.fromMs = this.fromMs === null ? p.tsMs : Math.min(this.fromMs, p.tsMs);
    this.toMs = this.toMs === null ? p.tsMs : Math.max(this.toMs, p.tsMs);
    return p.value;
  }
  bool(q: QuantityKey, tag = this.tag): boolean | null {
    const p = this.latest[tag]?.[q];
    return p && typeof p.value === "boolean" ? p.value : null;
  }
  str(q: QuantityKey, tag = this.tag): string | null {
    const p = this.latest[tag]?.[q];
    return p && typeof p.value === "string" ? p.value : null;
  }
}

const diff = <A extends number | null, B extends number | null>(
  a: A,
  b: B,
  f: (a: number, b: number) => number,
): number | null => (a === null || b === null ? null : f(a, b));

/** All pumps serving the chiller report proven flow (and at least one serves it). */
export function pumpsProven(site: Site, latest: LatestValues, chillerTag: string): boolean {
  const pumps = servingEquipment(site, chillerTag, "pump");
  return pumps.length > 0 && pumps.every((p) => booleanAt(latest, p.tag, "pump_status") === true);
}

/** Condenser water entering the chiller: its own sensor, else the leaving water of a tower serving it. */
function condenserWaterEnteringC(site: Site, r: InputReader, chillerTag: string): number | null {
  const own = r.num("condenser_water_entering_temp");
  if (own !== null) return own;
  for (const t of towersServing(site, chillerTag)) {
    const v = r.num("condenser_water_leaving_temp", t.tag);
    if (v !== null) return v;
  }
  return null;
}

export function chillerSnapshot(
  site: Site,
  latest: LatestValues,
  chiller: Equipment,
  nowMs: number,
  options: SnapshotOptions = {},
): ChillerSnapshot {
  const r = new InputReader(latest, chiller.tag);
  const running = r.bool("run_status");
  const chwIn = r.num("chilled_water_entering_temp");
  const chwOut = r.num("chilled_water_leaving_temp");
  const cwIn = condenserWaterEnteringC(site, r, chiller.tag);
  const cwOut = r.num("condenser_water_leaving_temp");
  const evapP = r.num("evaporator_refrigerant_pressure");
  const condP = r.num("condenser_refrigerant_pressure");
  // Without saturated-temperature points, the shells' pressures give them through the refrigerant's curve.
  const refrigerant = asRefrigerant(chiller.refrigerant) ?? "R-134a";
  const evapSat = r.num("evaporator_saturated_temp") ?? (evapP !== null ? saturationTempC(refrigerant, evapP) : null);
  const condSat = r.num("condenser_saturated_temp") ?? (condP !== null ? saturationTempC(refrigerant, condP) : null);
  const powerKw = r.num("compressor_power");

  const evapDt = diff(chwIn, chwOut, evaporatorDeltaTK);
  const flow = effectiveFlowLps({
    measuredFlowLps: r.num("chilled_water_flow"),
    designFlowLps: chiller.designFlowLps,
    pumpsProven: pumpsProven(site, latest, chiller.tag),
  });
  const loadKw = flow && evapDt !== null ? Math.max(0, waterLoadKw(flow.flowLps, evapDt)) : null;
  const loadTons = loadKw === null ? null : kwToTons(loadKw);
  const loaded = running !== false && loadTons !== null && loadTons > 0;

  const h = options.history?.[chiller.tag];
  const inhibit = latest[chiller.tag]?.restart_inhibit_time_left;
  const fallback = options.fallbackTimers?.(chiller) ?? null;
  const lockout = restartLockoutLeft({
    nowMs,
    inhibitLeftS: inhibit && typeof inhibit.value === "number" ? { value: inhibit.value, tsMs: inhibit.tsMs } : null,
    lastStartMs: h?.lastStartMs ?? null,
    lastStopMs: h?.lastStopMs ?? null,
    startToStartS: r.num("start_to_start_timer_setting") ?? fallback?.startToStartS ?? null,
    stopToStartS: r.num("stop_to_start_timer_setting") ?? fallback?.stopToStartS ?? null,
  });

  return {
    tag: chiller.tag,
    running,
    evaporatorDeltaTK: evapDt,
    condenserDeltaTK: diff(cwIn, cwOut, condenserDeltaTK),
    chilledWaterFlowLps: flow?.flowLps ?? null,
    flowSource: flow?.source ?? null,
    loadKw,
    loadTons,
    loadFraction: loadTons !== null && chiller.capacityTons ? loadTons / chiller.capacityTons : null,
    compressorPowerKw: powerKw,
    kwPerTon: loaded && powerKw !== null ? kwPerTon(powerKw, loadTons!) : null,
    cop: loaded && powerKw !== null ? cop(loadKw!, powerKw) : null,
    liftK: diff(condSat, evapSat, liftK),
    pressureLiftKPa: diff(condP, evapP, pressureLiftKPa),
    condenserApproachK: running ? diff(condSat, cwOut, condenserApproachK) : null,
    evaporatorApproachK: running ? diff(chwOut, evapSat, evaporatorApproachK) : null,
    crossoverMarginK: diff(cwIn, chwIn, crossoverMarginK),
    crossoverPressureMarginKPa: diff(condP, evapP, crossoverPressureMarginKPa),
    marginBasis: h?.marginBasis ?? null,
    startMarginK: h?.startMarginK ?? null,
    timeToCrossover: h?.marginSamples ? timeToCrossover(h.marginSamples, nowMs, options.timeToCrossover) : null,
    slowTimeToCrossover: h?.slowMarginSamples
      ? timeToCrossover(h.slowMarginSamples, nowMs, options.slowTimeToCrossover)
      : null,
    lockout,
    inputsFromMs: r.fromMs,
    inputsToMs: r.toMs,
  };
}

export function wetBulbC(site: Site, latest: LatestValues): number | null {
  for (const w of equipmentOfKind(site, "weather_station")) {
    const v = latest[w.tag]?.outdoor_wet_bulb_temp?.value;
    if (typeof v === "number") return v;
    // A station without a wet-bulb point: from dry bulb and relative humidity (ASHRAE psychrometrics).
    const dry = latest[w.tag]?.outdoor_air_temp?.value;
    const rh = latest[w.tag]?.outdoor_air_humidity?.value;
    if (typeof dry === "number" && typeof rh === "number") return psychrometricWetBulbC(dry, rh);
  }
  return null;
}

export function towerSnapshot(latest: LatestValues, tower: Equipment, wetBulb: number | null): TowerSnapshot {
  const r = new InputReader(latest, tower.tag);
  const hot = r.num("condenser_water_entering_temp");
  const cold = r.num("condenser_water_leaving_temp");
  return {
    tag: tower.tag,
    rangeK: diff(hot, cold, towerRangeK),
    approachK: diff(cold, wetBulb, towerApproachK),
    fanDriveMode: r.str("fan_drive_mode"),
    fanRunning: r.bool("fan_status"),
    inputsFromMs: r.fromMs,
    inputsToMs: r.toMs,
  };
}

/** Derived numbers for every chiller and tower of a site, as of `nowMs` (event time). */
export function computeSiteSnapshot(
  site: Site,
  latest: LatestValues,
  nowMs: number,
  options: SnapshotOptions = {},
): SiteSnapshot {
  const wb = wetBulbC(site, latest);
  return {
    atMs: nowMs,
    chillers: equipmentOfKind(site, "chiller").map((c) => chillerSnapshot(site, latest, c, nowMs, options)),
    towers: equipmentOfKind(site, "cooling_tower").map((t) => towerSnapshot(latest, t, wb)),
    wetBulbC: wb,
  };
}
