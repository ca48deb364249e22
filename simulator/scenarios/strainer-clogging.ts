// A condenser-water strainer clogging on a warm afternoon: CWP-1 keeps running and stays proven,
// but the flow through CH-1's condenser falls step by step. Nothing at the pump is wrong, so only
// the barrel's pressure drop (or a flow meter) tells; head pressure climbs as the flow falls.
import type { Scenario, ScriptedEvent } from "./types";
import { warmAfternoon } from "./profiles";

/** Share of design condenser-water flow left at each step (min after the start). */
export const strainerSteps: readonly { atMin: number; share: number }[] = [
  { atMin: 20, share: 0.8 },
  { atMin: 30, share: 0.6 },
  { atMin: 40, share: 0.4 },
  { atMin: 75, share: 1 },
];

export const strainerClogging: Scenario = {
  name: "strainer-clogging",
  title: "Condenser-water strainer clogging",
  description:
    "Warm afternoon. From 20 min the strainer ahead of CH-1's condenser clogs: condenser-water flow falls to 80 %, 60 % then 40 % of design at 20, 30 and 40 min while CWP-1 runs proven. The condenser water ΔP collapses with the square of the flow and head pressure climbs. The strainer is cleaned at 75 min.",
  defaultDurationS: 2 * 3600,
  startHour: 13,
  initial: () => ({}),
  conditions: warmAfternoon(13),
  script(layout) {
    const tag = layout.chillers[0].tag;
    return strainerSteps.map(({ atMin, share }): ScriptedEvent => ({
      atS: atMin * 60,
      command: {
        kind: "flow-restriction",
        equipment: tag,
        loop: "condenser_water",
        share,
        reason: share < 1 ? "Condenser-water strainer clogging" : "Strainer cleaned",
      },
    }));
  },
};
