// The simulator's public API: a pure, deterministic chilled-water plant model, its scenarios,
// site layouts, drill actions, and the point map / wire conversion a gateway publishes with.
export type { CanonicalReading } from "./readings";
export { runScenario, runPlant, warmedUpState, type RunScenarioOptions, type RunSample, type SimEvent } from "./run";
export { step, initialState, type InitialConditions } from "./plant";
export type { PlantState, StepInputs, StepResult, PlantCommand, ModelEvent, FaultEntry } from "./state";
export { scenarios, scenarioNames, getScenario, powerBlipRightActions, type Scenario } from "./scenarios";
export {
  siteLayouts,
  defaultLayout,
  getLayout,
  threeChillerLayout,
  equipmentOf,
  plantTons,
  type SiteLayout,
  type ChillerSpec,
  type EquipmentDef,
} from "./layout";
export {
  drillActionSchema,
  drillCommandSchema,
  actionOfCommand,
  timerLimits,
  type DrillAction,
  type DrillCommand,
} from "./actions-schema";
export {
  pointMapRows,
  pointMapCsv,
  pointName,
  toWire,
  fromWire,
  wireUnitOf,
  wireValue,
  formatWireValue,
} from "./points";
export type { PointMapRow } from "@/lib/point-map-csv";
