// Condenser tubes fouling over three weeks of ordinary summer days: the condenser approach creeps up,
// kW/ton rises with the lift, and hot afternoons push condenser pressure toward the cut-out.
import type { Scenario, ScriptedEvent } from "./types";
import { buildingLoadFraction, coilAirC, diurnalWeather, hourOf } from "./profiles";

const days = 21;
/** Fouling multiplies the condenser approach: 1 = clean, 4 ≈ 8 °F at full load after three weeks (assumed rate). */
const finalFouling = 4;

export const fouledCondenser: Scenario = {
  name: "fouled-condenser",
  title: "Fouled condenser tubes over three weeks",
  description:
    "Twenty-one ordinary summer days (75–93 °F). CH-1's condenser tubes foul steadily: its condenser approach climbs from ~2 °F to ~8 °F at full load, lift and kW/ton rise, and the hottest afternoons bring condenser pressure toward the high-pressure cut-out. CH-2 stays clean for comparison. Long: use --step 10 --sample 300.",
  defaultDurationS: days * 86400,
  defaultStepS: 10,
  defaultSampleS: 300,
  startHour: 0,
  initial: () => ({}),
  conditions(tS, layout) {
    const h = hourOf(this.startHour, tS);
    const w = diurnalWeather(h, 75, 93, 80, 45);
    const { loadFraction, ahus } = buildingLoadFraction(layout, h, w.dryBulbC);
    return { ...w, loadFraction, ahusScheduled: ahus, coilAirC: coilAirC(w.dryBulbC) };
  },
  script(layout) {
    const tag = layout.chillers[0].tag;
    const out: ScriptedEvent[] = [
      {
        atS: 0,
        command: {
          kind: "note",
          message: `${tag} condenser tubes begin to foul (scale build-up, no chemical treatment)`,
        },
      },
    ];
    for (let hour = 6; hour <= days * 24; hour += 6) {
      out.push({
        atS: hour * 3600,
        command: { kind: "condenser-fouling", equipment: tag, factor: 1 + ((finalFouling - 1) * hour) / (days * 24) },
      });
    }
    return out;
  },
};
