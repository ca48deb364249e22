import { OpenAPIRegistry, OpenApiGeneratorV31, type RouteConfig } from "@asteasolutions/zod-to-openapi";
import { z } from "zod";
import { errorStatus } from "@/lib/errors";
import type { Access, Operation } from "./operation";

// Builds the OpenAPI 3.1 document from the operation lists. Error responses follow from each
// operation's access level, so every route documents the same error body.

const errorBody = z
  .object({
    error: z.object({
      code: z.enum(Object.keys(errorStatus) as [keyof typeof errorStatus, ...(keyof typeof errorStatus)[]]),
      message: z.string(),
      details: z
        .unknown()
        .optional()
        .describe("For validation errors: a list of { path, message }, one per field (or CSV line and column)"),
    }),
  })
  .meta({ id: "Error" });

const accessText: Record<Access, string> = {
  public: "No sign-in needed.",
  "signed-in": "Any signed-in person or API token; a customer sees only its own organization's records.",
  staff: "Technicians and administrators (API token scope `act` for changes).",
  admin: "Administrators (API token scope `admin`).",
};

function errorResponses(op: Operation): Record<number, string> {
  const errors: Record<number, string> = { 429: "Too many requests", 503: "Storage unavailable" };
  if (op.body || op.query || op.params) errors[400] = "Invalid request: `details` lists each field's problem";
  if (op.body) errors[415] = "Wrong content type";
  if (op.access !== "public") errors[401] = "Not signed in, or the token is unknown, revoked or expired";
  if (op.access === "staff" || op.access === "admin") errors[403] = "The role or token scope does not allow this";
  if (op.path.includes("{")) errors[404] = "No such record, or not the caller's to see";
  return errors;
}

function pathParams(op: Operation): z.ZodObject | undefined {
  if (op.params) return op.params;
  const names = [...op.path.matchAll(/\{(\w+)\}/g)].map((m) => m[1]);
  if (names.length === 0) return undefined;
  return z.object(Object.fromEntries(names.map((n) => [n, z.string()])));
}

function toRouteConfig(op: Operation): RouteConfig {
  const responses: RouteConfig["responses"] = {};
  for (const [status, description] of Object.entries(op.responses))
    responses[status] =
      Number(status) === 204
        ? { description }
        : { description, content: { [op.responseType ?? "application/json"]: { schema: z.unknown() } } };
  for (const [status, description] of Object.entries(errorResponses(op)))
    responses[status] ??= { description, content: { "application/json": { schema: errorBody } } };
  const params = pathParams(op);
  return {
    method: op.method,
    path: op.path,
    tags: [op.tag],
    summary: op.summary,
    description: [op.description, accessText[op.access]].filter(Boolean).join("\n\n"),
    security: op.access === "public" ? [] : [{ session: [] }, { bearer: [] }],
    request: {
      ...(params ? { params } : {}),
      ...(op.query ? { query: op.query } : {}),
      ...(op.body
        ? { body: { required: true, content: { [op.bodyType ?? "application/json"]: { schema: op.body } } } }
        : {}),
    },
    responses,
  };
}

export function buildOpenApiDocument(operations: readonly Operation[], version: string) {
  const registry = new OpenAPIRegistry();
  registry.registerComponent("securitySchemes", "session", {
    type: "apiKey",
    in: "cookie",
    name: "next-auth.session-token",
    description: "The browser session after signing in (`__Secure-` prefixed over HTTPS).",
  });
  registry.registerComponent("securitySchemes", "bearer", {
    type: "http",
    scheme: "bearer",
    description: "An API token from Settings → API tokens, limited by its scope and its owner's role.",
  });
  for (const op of operations) registry.registerPath(toRouteConfig(op));
  return new OpenApiGeneratorV31(registry.definitions).generateDocument({
    openapi: "3.1.0",
    info: {
      title: "Liftline API",
      version,
      description:
        "Chilled-water plant records, live readings, alarms and the service call. Writes need `Content-Type: application/json` (or text/csv where stated) and, from a browser, a same-origin request.",
    },
    servers: [{ url: "/" }],
  });
}

export type OpenApiDocument = ReturnType<typeof buildOpenApiDocument>;
