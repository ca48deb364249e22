// A mild spring day: little load, a cool night. The lead chiller cycles off on low load overnight and back on
// when the building calls, within its anti-recycle timers; nothing abnormal, and the loops never cross.
import type { Scenario } from "./types";
import { buildingLoadFraction, coilAirC, diurnalWeather, hourOf } from "./profiles";

export const mildDay: Scenario = {
  name: "mild-day",
  title: "Mild spring day",
  description:
    "A mild spring day (48–68 °F dry bulb, 85 → 45 % humidity, wet bulb about 45–56 °F); office load; the lead chiller cycles off on low load overnight and restarts on its own when the load returns, respecting its anti-recycle timers; nothing abnormal.",
  defaultDurationS: 24 * 3600,
  startHour: 0,
  initial: () => ({}),
  conditions(tS, layout) {
    const h = hourOf(this.startHour, tS);
    const w = diurnalWeather(h, 48, 68, 85, 45);
    const { loadFraction, ahus } = buildingLoadFraction(layout, h, w.dryBulbC);
    return { ...w, loadFraction, ahusScheduled: ahus, coilAirC: coilAirC(w.dryBulbC) };
  },
  script: () => [
    { atS: 0, command: { kind: "note", message: "Mild spring day: light load, chiller cycling overnight" } },
  ],
};
