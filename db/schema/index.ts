export * from "./core";
export * from "./gateways";
