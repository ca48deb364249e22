// A full summer day: load follows occupancy and the weather, nothing abnormal.
import type { Scenario } from "./types";
import { buildingLoadFraction, coilAirC, diurnalWeather, hourOf } from "./profiles";

export const normalDay: Scenario = {
  name: "normal-day",
  title: "Normal day",
  description:
    "A full summer day (75–93 °F, wet bulb up to ~75 °F); load follows occupancy; chillers stage on and off; nothing abnormal.",
  defaultDurationS: 24 * 3600,
  startHour: 0,
  initial: () => ({}),
  conditions(tS, layout) {
    const w = diurnalWeather(hourOf(this.startHour, tS), 75, 93, 80, 45);
    const { loadFraction, ahus } = buildingLoadFraction(layout, hourOf(this.startHour, tS), w.dryBulbC);
    return { ...w, loadFraction, ahusScheduled: ahus, coilAirC: coilAirC(w.dryBulbC) };
  },
  script: () => [{ atS: 0, command: { kind: "note", message: "Normal day: load follows occupancy" } }],
};
