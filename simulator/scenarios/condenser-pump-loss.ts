// A condenser pump trips on motor overload on a warm afternoon: the lead chiller loses condenser flow,
// pressure spikes, it trips on flow loss and the standby chiller is called in.
import { cwPumpTag } from "../layout";
import type { Scenario } from "./types";
import { warmAfternoon } from "./profiles";

export const pumpTripAtS = 20 * 60;

export const condenserPumpLoss: Scenario = {
  name: "condenser-pump-loss",
  title: "Condenser pump loss",
  description:
    "Warm afternoon. At 20 min CWP-1 trips on motor overload: CH-1's condenser water ΔP collapses, condenser pressure jumps, CH-1 trips on condenser water flow loss (latched) and the standby chiller is called. The overload is reset at 60 min and CH-1's alarm at 65 min.",
  defaultDurationS: 2 * 3600,
  startHour: 13,
  initial: () => ({}),
  conditions: warmAfternoon(13),
  script: (layout) => [
    { atS: 0, command: { kind: "note", message: "Warm afternoon, lead chiller carrying the load" } },
    { atS: pumpTripAtS, command: { kind: "pump-trip", equipment: cwPumpTag(0), reason: "motor overload" } },
    { atS: 60 * 60, command: { kind: "pump-reset", equipment: cwPumpTag(0) } },
    {
      atS: 65 * 60,
      command: {
        kind: "drill",
        source: "scenario",
        action: { type: "reset-alarm", equipment: layout.chillers[0].tag },
      },
    },
  ],
};
