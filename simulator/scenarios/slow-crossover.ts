// A cold day with a small load: the tower over-cools the condenser water on natural draft alone and the
// loops drift toward crossover with no fault anywhere.
import { plantTons } from "../layout";
import type { Scenario } from "./types";
import { coilAirC, diurnalWeather, hourOf } from "./profiles";

export const slowCrossover: Scenario = {
  name: "slow-crossover",
  title: "Slow crossover on a cold day",
  description:
    "Cold afternoon into night (38 → 16 °F, wet bulb falling into the teens). Interior-zone load only (~20 % of one chiller). The tower fan sits off at its 65 °F floor but natural draft alone over-cools the condenser water, which drifts down to the chilled water: lift and the motor/drive cooling pressure difference shrink and the drive creeps warmer, with no fault: the low-lift safety stops the compressor when the pressure difference stays below its minimum, and the controller restarts it when its timers allow.",
  defaultDurationS: 10 * 3600,
  startHour: 14,
  initial: (layout) => ({ disabledChillers: layout.chillers.slice(1).map((c) => c.tag) }),
  conditions(tS, layout) {
    const h = hourOf(this.startHour, tS);
    const w = diurnalWeather(h, 16, 38, 80, 55);
    const lead = layout.chillers[0].capacityTons;
    // Interior zones: load falls from ~28 % of the lead chiller in the afternoon to ~18 % at night.
    const occ = Math.max(0, Math.min(1, 1 - tS / (5 * 3600)));
    const loadFraction = ((0.18 + 0.1 * occ) * lead) / (layout.design.peakLoadFraction * plantTons(layout));
    return { ...w, loadFraction: loadFraction * layout.airHandlers, ahusScheduled: 1, coilAirC: coilAirC(w.dryBulbC) };
  },
  script: () => [
    { atS: 0, command: { kind: "note", message: "Cold day, interior load only; tower on natural draft" } },
  ],
};
