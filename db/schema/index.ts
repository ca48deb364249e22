export * from "./core";
export * from "./gateways";
export * from "./alarms";
export * from "./records";
export * from "./service";
export * from "./notify";
export * from "./learning";
