import {
  buildOpenApiDocument,
  plantOperations,
  pointOperations,
  recordOperations,
  serviceOperations,
  fileOperations,
  peopleOperations,
  notifyOperations,
  simulatorOperations,
  incidentOperations,
  type OpenApiDocument,
} from "@/lib/openapi";
import { drillOperations } from "@/lib/openapi/paths/drills";
import { startRunSchemaFor } from "@/lib/schemas/simulator";
import { drillActionSchema } from "@/simulator/actions-schema";
import { scenarioNames } from "@/simulator/scenarios";
import pkg from "@/package.json" with { type: "json" };

let cached: OpenApiDocument | undefined;

/** The whole API's OpenAPI 3.1 document, built once from the same zod schemas the routes parse with. */
export function openApiDocument(): OpenApiDocument {
  cached ??= buildOpenApiDocument(
    [
      ...plantOperations,
      ...recordOperations,
      ...pointOperations,
      ...serviceOperations,
      ...fileOperations,
      ...peopleOperations,
      ...notifyOperations,
      ...incidentOperations,
      ...drillOperations,
      ...simulatorOperations({ startRun: startRunSchemaFor(scenarioNames), drillAction: drillActionSchema }),
    ],
    pkg.version,
  );
  return cached;
}
