// The scenario catalogue.
import { condenserPumpLoss } from "./condenser-pump-loss";
import { designSteady } from "./design-steady";
import { fouledCondenser } from "./fouled-condenser";
import { mildDay } from "./mild-day";
import { normalDay } from "./normal-day";
import { powerBlip } from "./power-blip";
import { slowCrossover } from "./slow-crossover";
import { strainerClogging } from "./strainer-clogging";
import type { Scenario } from "./types";

export const scenarios: Record<string, Scenario> = {
  [normalDay.name]: normalDay,
  [mildDay.name]: mildDay,
  [powerBlip.name]: powerBlip,
  [slowCrossover.name]: slowCrossover,
  [condenserPumpLoss.name]: condenserPumpLoss,
  [strainerClogging.name]: strainerClogging,
  [fouledCondenser.name]: fouledCondenser,
  [designSteady.name]: designSteady,
};

export const scenarioNames = Object.keys(scenarios);

export function getScenario(name: string): Scenario {
  const s = scenarios[name];
  if (!s) throw new Error(`unknown scenario "${name}" (known: ${scenarioNames.join(", ")})`);
  return s;
}

export type { Scenario, ScenarioConditions, ScriptedEvent } from "./types";
export { powerBlipRightActions, powerBlipAtS, lateResetAtS } from "./power-blip";
