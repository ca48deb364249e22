// The incident this product exists for: a utility blip on a mild day drops the tower fan drive into OFF,
// the chiller trips on high condenser pressure, and while restart is held off the loops cross.
import { ahuTag, plantTons } from "../layout";
import type { Scenario } from "./types";
import { coilAirC, diurnalWeather, hourOf } from "./profiles";

export const powerBlipAtS = 10 * 60;
/** In the replayed call, the alarm was reset only after the loops had crossed (scripted late response). */
export const lateResetAtS = 170 * 60;

export const powerBlip: Scenario = {
  name: "power-blip",
  title: "Power blip: tower fan drive comes back in OFF",
  description:
    "Mild day (wet bulb mid-50s °F). A utility blip faults the drives; the tower fan drive reboots in OFF with its fault gone. Condenser water climbs past 100 °F, the chiller trips on high condenser pressure, anti-recycle holds it off while the air handlers keep loading the loop, and the loops cross. The late reset restarts the chiller into crossed loops and it trips on drive over-temperature.",
  defaultDurationS: 4 * 3600,
  startHour: 10,
  initial: (layout) => ({ disabledChillers: layout.chillers.slice(1).map((c) => c.tag) }),
  conditions(tS, layout) {
    const w = diurnalWeather(hourOf(this.startHour, tS), 58, 70, 75, 45);
    // Load the lead chiller to ~80 % of its capacity (the others are out of service for the day).
    const lead = layout.chillers[0].capacityTons;
    const loadFraction = (0.8 * lead) / (layout.design.peakLoadFraction * plantTons(layout));
    return { ...w, loadFraction, ahusScheduled: layout.airHandlers, coilAirC: coilAirC(w.dryBulbC) };
  },
  script: (layout) => [
    {
      atS: 0,
      command: {
        kind: "note",
        message: `Mild day; ${
          layout.chillers.length > 1
            ? layout.chillers
                .slice(1)
                .map((c) => c.tag)
                .join(", ") + " out of service (condenser tubes being cleaned); "
            : ""
        }${layout.chillers[0].tag} carrying the building`,
      },
    },
    { atS: powerBlipAtS, command: { kind: "power-blip", durationS: 2 } },
    {
      atS: lateResetAtS,
      command: { kind: "note", message: "Late response: alarm reset after the loops have crossed" },
    },
    {
      atS: lateResetAtS,
      command: {
        kind: "drill",
        source: "scenario",
        action: { type: "reset-alarm", equipment: layout.chillers[0].tag },
      },
    },
  ],
};

/** The right actions, early: fan back to auto, shed air handlers, shorten the timers, reset, restart before crossover. */
export function powerBlipRightActions(
  layout: { chillers: Array<{ tag: string }>; airHandlers: number },
  tripAtS: number,
) {
  const ch = layout.chillers[0].tag;
  const shed = Array.from({ length: Math.max(0, layout.airHandlers - 1) }, (_, i) => ahuTag(i + 1));
  return [
    { atS: tripAtS + 60, action: { type: "set-fan-drive-mode" as const, equipment: "CT-1", mode: "auto" as const } },
    ...shed.map((equipment) => ({
      atS: tripAtS + 90,
      action: { type: "set-air-handler" as const, equipment, run: false },
    })),
    {
      atS: tripAtS + 120,
      action: {
        type: "set-anti-recycle-timer" as const,
        equipment: ch,
        timer: "start-to-start" as const,
        seconds: 120,
      },
    },
    {
      atS: tripAtS + 120,
      action: { type: "set-anti-recycle-timer" as const, equipment: ch, timer: "stop-to-start" as const, seconds: 60 },
    },
    { atS: tripAtS + 240, action: { type: "reset-alarm" as const, equipment: ch } },
  ];
}
