// Steady operation at the design point: 95 °F dry bulb / 78 °F wet bulb, the building at the installed capacity.
// Used to check the model against AHRI 550/590 rating conditions (REFERENCES.md §3, §5).
import { wetBulbC } from "@/lib/psychrometrics";
import { fToC } from "@/lib/plant/units";
import type { Scenario } from "./types";

/** Relative humidity that gives the design wet bulb at the design dry bulb (bisection on PsychroLib). */
function rhForWetBulb(dryC: number, wbC: number): number {
  let lo = 1;
  let hi = 100;
  for (let i = 0; i < 50; i++) {
    const mid = (lo + hi) / 2;
    if (wetBulbC(dryC, mid) < wbC) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

const designDryC = fToC(95);
let cachedRh: number | undefined;

export const designSteady: Scenario = {
  name: "design-steady",
  title: "Design point, steady",
  description:
    "Held at 95 °F dry bulb / 78 °F wet bulb with the building at ~97 % of installed capacity, all chillers staged: a commissioning check against the rating conditions.",
  defaultDurationS: 3 * 3600,
  startHour: 14,
  initial: () => ({}),
  conditions(_tS, layout) {
    cachedRh ??= rhForWetBulb(designDryC, fToC(layout.design.wetBulbF));
    // AHU design loads add up to peakLoadFraction × installed tons; scale to 97 % of installed.
    const loadFraction = 0.97 / layout.design.peakLoadFraction;
    return {
      dryBulbC: designDryC,
      rhPct: cachedRh,
      loadFraction,
      ahusScheduled: layout.airHandlers,
      coilAirC: fToC(80),
    };
  },
  script: () => [{ atS: 0, command: { kind: "note", message: "Design point hold: 95 °F / 78 °F wet bulb" } }],
};
