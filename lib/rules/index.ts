export * from "./condition";
export * from "./settings";
export * from "./history";
export * from "./context";
export * from "./evaluate";
export * from "./runner";
export { averagedEfficiency } from "./efficiency-drift";
