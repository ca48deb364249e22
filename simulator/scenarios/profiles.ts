// Daily weather and occupancy shapes shared by the scenarios.
import type { SiteLayout } from "../layout";
import type { ScenarioConditions } from "./types";
import { fToC } from "@/lib/plant/units";

export const hourOf = (startHour: number, tS: number): number => (((startHour + tS / 3600) % 24) + 24) % 24;

/** Dry bulb and humidity over a day: warmest at 15:00, coolest at 03:00; humidity moves opposite (a cosine day). */
export function diurnalWeather(
  hour: number,
  minF: number,
  maxF: number,
  rhAtMin: number,
  rhAtMax: number,
): { dryBulbC: number; rhPct: number } {
  const x = (1 + Math.cos((2 * Math.PI * (hour - 15)) / 24)) / 2; // 1 at 15:00, 0 at 03:00
  return { dryBulbC: fToC(minF + (maxF - minF) * x), rhPct: rhAtMin + (rhAtMax - rhAtMin) * x };
}

function ramp(h: number, a: number, b: number): number {
  return Math.min(1, Math.max(0, (h - a) / (b - a)));
}

/** Occupancy 0…1 and how many air handlers the schedule runs, by the site's load profile. */
export function occupancy(layout: SiteLayout, hour: number): { occ: number; ahus: number } {
  const n = layout.airHandlers;
  switch (layout.loadProfile) {
    case "constant":
      return { occ: 1, ahus: n };
    case "school": {
      const occ = ramp(hour, 6, 7.5) * (1 - ramp(hour, 15, 16.5));
      return { occ, ahus: occ > 0 ? n : 1 };
    }
    case "office": {
      const occ = ramp(hour, 5.5, 7.5) * (1 - ramp(hour, 17.5, 19.5));
      return { occ, ahus: occ > 0 ? n : 1 };
    }
  }
}

/** Building load fraction of design: a base (24/7 areas, data equipment) plus occupancy scaled by how hot it is. */
export function buildingLoadFraction(
  layout: SiteLayout,
  hour: number,
  dryBulbC: number,
): { loadFraction: number; ahus: number } {
  const { occ, ahus } = occupancy(layout, hour);
  const heat = Math.min(1.05, Math.max(0, (dryBulbC - fToC(60)) / (fToC(95) - fToC(60))));
  if (layout.loadProfile === "constant") return { loadFraction: 0.85 + 0.1 * heat, ahus };
  const base = 0.15;
  return { loadFraction: base + occ * (0.45 + 0.55 * heat - base), ahus };
}

/** Mixed air entering the coils: 75 % return air at 75 °F, 25 % outdoor air (minimum outdoor air, common practice). */
export function coilAirC(dryBulbC: number): number {
  return 0.75 * fToC(75) + 0.25 * dryBulbC;
}

/** A warm afternoon (72–88 °F) with the building at 70 % of its usual load: the scene of the plant-fault scenarios. */
export function warmAfternoon(startHour: number): (tS: number, layout: SiteLayout) => ScenarioConditions {
  return (tS, layout) => {
    const w = diurnalWeather(hourOf(startHour, tS), 72, 88, 75, 50);
    const { loadFraction, ahus } = buildingLoadFraction(layout, hourOf(startHour, tS), w.dryBulbC);
    return { ...w, loadFraction: loadFraction * 0.7, ahusScheduled: ahus, coilAirC: coilAirC(w.dryBulbC) };
  };
}
