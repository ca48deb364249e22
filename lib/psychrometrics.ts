// Moist-air psychrometrics through PsychroLib (ASHRAE Handbook—Fundamentals 2017, ch. 1), SI units.
import shared, { type PsychroLib } from "psychrolib";

// The package exports one shared instance whose unit system is global; build a private SI instance
// from its constructor so another caller switching to IP cannot change our results.
const Ctor = (shared as unknown as { constructor: new () => PsychroLib }).constructor;
const psychro: PsychroLib = new Ctor();
psychro.SetUnitSystem(shared.SI);

export const seaLevelPressurePa = 101325;

/** Wet-bulb temperature (°C) from dry bulb (°C) and relative humidity (0–100 %). */
export function wetBulbC(dryBulbC: number, relHumPct: number, pressurePa = seaLevelPressurePa): number {
  const rh = Math.min(Math.max(relHumPct / 100, 0), 1);
  return psychro.GetTWetBulbFromRelHum(dryBulbC, rh, pressurePa);
}
