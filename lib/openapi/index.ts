export { buildOpenApiDocument, type OpenApiDocument } from "./document";
export type { Access, Operation } from "./operation";
export { plantOperations } from "./paths/plant";
export { simulatorOperations } from "./paths/simulator";
export { notifyOperations } from "./paths/notify";
