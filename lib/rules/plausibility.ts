// Sensor plausibility: a reading outside what the physical quantity can be, one that jumps faster
// than the water or refrigerant can change, one frozen while its equipment runs, or a saturated
// temperature that disagrees with its own pressure. A failed sensor raises its own low-priority alarm
// and suppresses, by design (ISA-18.2), the rules that rest on it: a broken condenser-water sensor
// must not page a crossover.

import { asRefrigerant } from "@/lib/plant/equipment-limits";
import { towersServing, type Equipment } from "@/lib/plant/site";
import { quantities, type QuantityKey } from "@/lib/quantities";
import type { Condition, RuleId } from "./condition";
import { bool, type RuleContext } from "./context";
import { fmtDelta, fmtPressure, fmtTemp } from "./format";
import { makeCondition } from "./make-condition";
import { cachedSaturationTempC } from "./saturation";

/** What each watched quantity can physically read, canonical units (°C, kPa absolute); common practice. */
export const plausibleRange: Partial<Record<QuantityKey, readonly [number, number]>> = {
  // Liquid water in a comfort-cooling plant: above freezing (with margin for glycol) and below 60 °C.
  chilled_water_entering_temp: [-5, 60],
  chilled_water_leaving_temp: [-5, 60],
  condenser_water_entering_temp: [-5, 60],
  condenser_water_leaving_temp: [-5, 60],
  // Low-pressure refrigerants (R-134a, R-1234ze(E), R-513A) between a deep vacuum and a relief setting.
  evaporator_refrigerant_pressure: [5, 2500],
  condenser_refrigerant_pressure: [5, 2500],
  evaporator_saturated_temp: [-40, 60],
  condenser_saturated_temp: [-40, 80],
  drive_temp: [-30, 120],
};

/** Fastest believable change between two readings, per second; water loops and shells have mass. */
export const maxRatePerS: Partial<Record<QuantityKey, number>> = {
  chilled_water_entering_temp: 0.5,
  chilled_water_leaving_temp: 0.5,
  condenser_water_entering_temp: 0.5,
  condenser_water_leaving_temp: 0.5,
  evaporator_refrigerant_pressure: 60,
  condenser_refrigerant_pressure: 60,
  drive_temp: 2,
};

const watched = Object.keys(plausibleRange) as QuantityKey[];

/**
 * A reading that moves with this one on the same equipment: a flat value counts as frozen only while
 * its companion moved (a gateway reporting on change of value sends the same value for hours in a
 * steady plant, and that is not a fault).
 */
const companion: Partial<Record<QuantityKey, QuantityKey>> = {
  chilled_water_entering_temp: "chilled_water_leaving_temp",
  chilled_water_leaving_temp: "chilled_water_entering_temp",
  condenser_water_entering_temp: "condenser_water_leaving_temp",
  condenser_water_leaving_temp: "condenser_water_entering_temp",
  evaporator_refrigerant_pressure: "chilled_water_leaving_temp",
  condenser_refrigerant_pressure: "condenser_water_leaving_temp",
};

/** The inputs each rule rests on, read on the condition's own equipment (and the towers serving a chiller). */
export const restsOn: Partial<Record<RuleId, readonly QuantityKey[]>> = {
  crossover_risk: [
    "condenser_water_entering_temp",
    "condenser_water_leaving_temp",
    "chilled_water_entering_temp",
    "evaporator_refrigerant_pressure",
    "condenser_refrigerant_pressure",
  ],
  restart_race: [
    "condenser_water_entering_temp",
    "condenser_water_leaving_temp",
    "chilled_water_entering_temp",
    "evaporator_refrigerant_pressure",
    "condenser_refrigerant_pressure",
  ],
  loops_crossed: [
    "condenser_water_entering_temp",
    "condenser_water_leaving_temp",
    "chilled_water_entering_temp",
    "evaporator_refrigerant_pressure",
    "condenser_refrigerant_pressure",
  ],
  head_pressure_near_trip: ["condenser_refrigerant_pressure"],
  low_evaporator_pressure: ["evaporator_refrigerant_pressure", "evaporator_saturated_temp"],
  drive_temp_toward_trip: ["drive_temp"],
  chilled_water_not_made: ["chilled_water_leaving_temp"],
};

export interface SensorFault {
  tag: string;
  quantity: QuantityKey;
  reason: string;
}

/** Every watched point of the site that fails a check at `ctx.nowMs`. */
export function sensorFaults(ctx: RuleContext): SensorFault[] {
  const s = ctx.settings.sensorPlausibility;
  if (!s.enabled) return [];
  const out: SensorFault[] = [];
  for (const e of ctx.site) {
    const running = bool(ctx, e.tag, e.kind === "cooling_tower" ? "fan_status" : "run_status") === true;
    for (const q of watched) {
      const latest = ctx.history.latestAt(e.tag, q, ctx.nowMs);
      if (!latest || typeof latest.value !== "number") continue;
      const v = latest.value;
      const [lo, hi] = plausibleRange[q]!;
      if (!Number.isFinite(v) || v < lo || v > hi) {
        const shown = !Number.isFinite(v)
          ? String(v)
          : quantities[q].measure === "pressure"
            ? fmtPressure(v)
            : fmtTemp(v);
        out.push({ tag: e.tag, quantity: q, reason: `reads ${shown}, outside what it can be` });
        continue;
      }
      const rate = maxRatePerS[q];
      if (rate !== undefined) {
        const prev = ctx.history.latestAt(e.tag, q, latest.tsMs - 1);
        if (prev && typeof prev.value === "number" && latest.tsMs - prev.tsMs <= s.rateWindowS * 1000) {
          const perS = Math.abs(v - prev.value) / ((latest.tsMs - prev.tsMs) / 1000);
          if (perS > rate) {
            out.push({ tag: e.tag, quantity: q, reason: "jumped faster than the water or refrigerant can change" });
            continue;
          }
        }
      }
      // The same value for this long while the equipment runs and its companion moved is a frozen
      // input or a gateway repeating a stale value.
      const other = companion[q];
      // The reading of most of a window ago decides cheaply: a value that moved is not frozen.
      const then = running && other ? ctx.history.latestAt(e.tag, q, ctx.nowMs - s.stuckAfterS * 900) : undefined;
      if (other && then?.value === v) {
        const fromMs = ctx.nowMs - s.stuckAfterS * 1000;
        const window = ctx.history.numbers(e.tag, q, fromMs, ctx.nowMs);
        const spanS = window.length ? (window[window.length - 1].tsMs - window[0].tsMs) / 1000 : 0;
        const moved = ctx.history.numbers(e.tag, other, fromMs, ctx.nowMs).map((p) => p.value);
        const companionMovedK = moved.length ? Math.max(...moved) - Math.min(...moved) : 0;
        if (
          window.length >= 10 &&
          spanS >= s.stuckAfterS * 0.9 &&
          companionMovedK >= s.companionMovedAtLeast &&
          window.every((p) => p.value === v)
        ) {
          out.push({
            tag: e.tag,
            quantity: q,
            reason: `has not moved for ${Math.round(spanS / 60)} min while running`,
          });
          continue;
        }
      }
    }
    if (e.kind === "chiller") out.push(...saturationDisagreement(ctx, e));
  }
  return out;
}

/** A saturated temperature read beside its shell's pressure must match the refrigerant's curve. */
function saturationDisagreement(ctx: RuleContext, chiller: Equipment): SensorFault[] {
  const refrigerant = asRefrigerant(chiller.refrigerant);
  if (!refrigerant) return [];
  const satOf = cachedSaturationTempC(refrigerant);
  const out: SensorFault[] = [];
  for (const [pq, tq] of [
    ["evaporator_refrigerant_pressure", "evaporator_saturated_temp"],
    ["condenser_refrigerant_pressure", "condenser_saturated_temp"],
  ] as const) {
    const p = ctx.history.latestAt(chiller.tag, pq, ctx.nowMs)?.value;
    const t = ctx.history.latestAt(chiller.tag, tq, ctx.nowMs)?.value;
    if (typeof p !== "number" || typeof t !== "number") continue;
    const [lo, hi] = plausibleRange[pq]!;
    if (p < lo || p > hi) continue;
    const diffK = Math.abs(satOf(p) - t);
    if (diffK > ctx.settings.sensorPlausibility.saturationToleranceK)
      out.push({
        tag: chiller.tag,
        quantity: tq,
        reason: `disagrees with its pressure by ${fmtDelta(diffK)} on the ${refrigerant} curve`,
      });
  }
  return out;
}

/** One low-priority condition per piece of equipment, naming each failed sensor. */
export function sensorImplausible(ctx: RuleContext, faults: readonly SensorFault[]): Condition[] {
  const s = ctx.settings.sensorPlausibility;
  if (!s.enabled) return [];
  return ctx.site.map((e) => {
    const mine = faults.filter((f) => f.tag === e.tag);
    const active = mine.length > 0;
    const list = mine.map((f) => `${quantities[f.quantity].label.toLowerCase()} ${f.reason}`).join("; ");
    return makeCondition({
      ruleId: "sensor_implausible",
      equipment: e.tag,
      active,
      priority: s.priority,
      atMs: ctx.nowMs,
      technicianMessage: active ? `${e.tag}: ${list}.` : `${e.tag}: sensors plausible.`,
      ownerMessage: active
        ? "A sensor on your plant reads something it cannot be; warnings that rely on it are held until it is fixed."
        : "Sensors read plausibly.",
      advice: active
        ? [
            "Check the sensor, its wiring and its point mapping at the controller or gateway; compare with a calibrated thermometer or gauge.",
            "Warnings that rest on this sensor are suppressed by design until it reads plausibly again: watch the plant by other means meanwhile.",
          ]
        : [],
      numbers: { failedSensors: mine.length },
    });
  });
}

/**
 * Marks conditions whose inputs failed as suppressed by design, with the reason on record. A chiller's
 * condenser-water reading may come from the towers serving it, so their faults count for it too.
 */
export function suppressOnFailedSensors(
  ctx: RuleContext,
  conditions: Condition[],
  faults: readonly SensorFault[],
): Condition[] {
  if (faults.length === 0) return conditions;
  return conditions.map((c) => {
    const inputs = restsOn[c.ruleId];
    if (!inputs) return c;
    const tags = new Set([c.equipment, ...towersServing(ctx.site, c.equipment).map((t) => t.tag)]);
    const failed = faults.find((f) => tags.has(f.tag) && inputs.includes(f.quantity));
    if (!failed) return c;
    return {
      ...c,
      // Plain words without numbers: the reason is stored with the alarm and shown as it is.
      suppressedReason: `${failed.tag} ${quantities[failed.quantity].label.toLowerCase()} failed its plausibility check`,
    };
  });
}
