export { buildOpenApiDocument, type OpenApiDocument } from "./document";
export type { Access, Operation } from "./operation";
export { plantOperations } from "./paths/plant";
export { simulatorOperations } from "./paths/simulator";
export { recordOperations } from "./paths/records";
export { pointOperations } from "./paths/points";
export { serviceOperations } from "./paths/service";
export { fileOperations } from "./paths/files";
export { peopleOperations } from "./paths/people";
