import fs from "node:fs";
import path from "node:path";
import { Validator } from "@seriousme/openapi-schema-validator";
import { describe, expect, it } from "vitest";
import { openApiDocument } from "@/lib/server/openapi";

// The API description is checked against the OpenAPI 3.1 schema published by the OpenAPI
// Initiative (through @seriousme/openapi-schema-validator), and against the route handlers
// that exist under app/api, so a new route cannot go undocumented.

const API_DIR = path.resolve(__dirname, "../../app/api");
/** next-auth's own sign-in endpoints: the framework's protocol, not Liftline's API. */
const FRAMEWORK_ROUTES = ["/api/auth/[...nextauth]"];

function routeHandlers(): { path: string; method: string }[] {
  const out: { path: string; method: string }[] = [];
  const walk = (dir: string) => {
    for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
      const full = path.join(dir, entry.name);
      if (entry.isDirectory()) walk(full);
      else if (entry.name === "route.ts") {
        const urlPath = "/api/" + path.relative(API_DIR, dir).split(path.sep).join("/");
        if (FRAMEWORK_ROUTES.includes(urlPath)) continue;
        const source = fs.readFileSync(full, "utf8");
        const methods = [
          ...source.matchAll(/export (?:const|async function|function) (GET|POST|PUT|PATCH|DELETE)\b/g),
        ].map((m) => m[1]);
        expect(methods.length, `${urlPath} exports no handler`).toBeGreaterThan(0);
        for (const method of methods)
          out.push({ path: urlPath.replace(/\[(\w+)\]/g, "{$1}"), method: method.toLowerCase() });
      }
    }
  };
  walk(API_DIR);
  return out;
}

describe("OpenAPI document", () => {
  const doc = openApiDocument();

  it("is a valid OpenAPI 3.1 document (OpenAPI Initiative schema)", async () => {
    const validator = new Validator();
    const result = await validator.validate(JSON.parse(JSON.stringify(doc)));
    expect(result.errors ?? []).toEqual([]);
    expect(result.valid).toBe(true);
    expect(validator.version).toBe("3.1");
  });

  it("documents every route handler in app/api, and nothing that does not exist", () => {
    const handlers = routeHandlers();
    expect(handlers.length).toBeGreaterThan(30);
    const documented = Object.entries(doc.paths ?? {}).flatMap(([p, item]) =>
      Object.keys(item ?? {})
        .filter((k) => ["get", "post", "put", "patch", "delete"].includes(k))
        .map((method) => `${method.toUpperCase()} ${p}`),
    );
    const existing = handlers.map((h) => `${h.method.toUpperCase()} ${h.path}`);
    expect(
      existing.filter((h) => !documented.includes(h)),
      "undocumented",
    ).toEqual([]);
    expect(
      documented.filter((d) => !existing.includes(d)),
      "documented but missing",
    ).toEqual([]);
  });

  it("describes request bodies from the routes' own zod schemas", () => {
    const shelve = doc.paths?.["/api/alarms/{alarmId}/shelve"]?.post?.requestBody;
    const schema = (shelve as { content: Record<string, { schema: Record<string, unknown> }> }).content[
      "application/json"
    ].schema as { required?: string[]; properties?: Record<string, { maximum?: number }> };
    expect(schema.required).toEqual(expect.arrayContaining(["minutes", "reason"]));
    expect(schema.properties?.minutes?.maximum).toBe(24 * 60);
  });

  it("gives every protected operation its 401 and every write its 400", () => {
    for (const [p, item] of Object.entries(doc.paths ?? {}))
      for (const [method, op] of Object.entries(item ?? {})) {
        const o = op as { security?: unknown[]; responses: Record<string, unknown>; requestBody?: unknown };
        if (o.security?.length) expect(o.responses["401"], `${method} ${p}`).toBeDefined();
        if (o.requestBody) expect(o.responses["400"], `${method} ${p}`).toBeDefined();
      }
  });
});
