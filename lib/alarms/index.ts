export * from "./priority";
export * from "./states";
export * from "./state-machine";
export * from "./delay";
export * from "./book";
export * from "./health";
