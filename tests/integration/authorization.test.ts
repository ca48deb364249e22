import Database from "better-sqlite3";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { signIn, startServer, type TestServer } from "../helpers/server";

// The authorization matrix against the real server: every role × endpoint × own/other site.
let server: TestServer;
const cookies: Record<string, string> = {};
const bodies: string[] = [];

const accounts = {
  admin: "admin@tallgrass.example",
  technician: "luis@tallgrass.example",
  customer: "facilities@harborview.example",
} as const;
type Who = keyof typeof accounts | "anonymous";

const OWN_SITE = "harborview-mob"; // the customer's own site
const OTHER_SITE = "quarry-ridge-dh2"; // another customer's

async function call(who: Who | { bearer: string }, path: string, init: RequestInit = {}): Promise<Response> {
  const headers = new Headers(init.headers);
  if (typeof who === "object") headers.set("authorization", `Bearer ${who.bearer}`);
  else if (who !== "anonymous") {
    headers.set("cookie", cookies[who]);
    headers.set("origin", server.url); // as a browser's page would (lib/server/origin.ts)
  }
  const res = await fetch(server.url + path, { ...init, headers, redirect: "manual" });
  const text = await res.clone().text();
  bodies.push(text);
  return res;
}

beforeAll(async () => {
  server = await startServer();
  for (const [role, email] of Object.entries(accounts)) {
    const res = await signIn(server.url, email);
    expect(res.cookie, `sign-in of ${role}`).toBeTruthy();
    cookies[role] = res.cookie!;
  }
});

afterAll(async () => {
  await server?.stop();
  // No response body, in any test above, ever carried a password hash or a token hash.
  const db = new Database(server.databasePath, { readonly: true });
  const secrets = [
    ...(db.prepare("select password_hash as h from users").all() as { h: string }[]).map((r) => r.h),
    ...(db.prepare("select token_hash as h from api_tokens").all() as { h: string }[]).map((r) => r.h),
  ];
  db.close();
  expect(secrets.length).toBeGreaterThan(6);
  for (const body of bodies) {
    for (const secret of secrets) expect(body.includes(secret)).toBe(false);
    expect(body).not.toMatch(/\$2[aby]\$\d\d\$/); // no bcrypt hash of any kind
    expect(body).not.toMatch(/password_?hash|token_?hash/i);
  }
});

const matrix: Array<{ path: string; expect: Record<Who, number> }> = [
  { path: "/api/sites", expect: { anonymous: 401, admin: 200, technician: 200, customer: 200 } },
  { path: `/api/sites/${OWN_SITE}`, expect: { anonymous: 401, admin: 200, technician: 200, customer: 200 } },
  { path: `/api/sites/${OTHER_SITE}`, expect: { anonymous: 401, admin: 200, technician: 200, customer: 404 } },
  { path: "/api/sites/no-such-site", expect: { anonymous: 401, admin: 404, technician: 404, customer: 404 } },
  { path: "/api/tokens", expect: { anonymous: 401, admin: 200, technician: 200, customer: 200 } },
  { path: "/api/health", expect: { anonymous: 200, admin: 200, technician: 200, customer: 200 } },
];

describe("API authorization matrix", () => {
  for (const row of matrix) {
    for (const who of ["anonymous", "admin", "technician", "customer"] as const) {
      it(`${who} GET ${row.path} → ${row.expect[who]}`, async () => {
        const res = await call(who, row.path);
        expect(res.status).toBe(row.expect[who]);
        if (res.status === 401) expect((await res.json()).error.code).toBe("unauthorized");
      });
    }
  }

  it("a customer's site list holds only its own organization's sites", async () => {
    const { sites } = await (await call("customer", "/api/sites")).json();
    expect(sites.map((s: { id: string }) => s.id)).toEqual([OWN_SITE]);
  });

  it("staff see all three demo sites with their equipment counts", async () => {
    for (const who of ["admin", "technician"] as const) {
      const { sites } = await (await call(who, "/api/sites")).json();
      expect(sites).toHaveLength(3);
      for (const s of sites) expect(s.equipmentCount).toBeGreaterThan(5);
    }
  });

  it("the site detail carries equipment with points in canonical units and Brick classes", async () => {
    const { site } = await (await call("technician", `/api/sites/${OWN_SITE}`)).json();
    const chiller = site.equipment.find((e: { tag: string }) => e.tag === "CH-1");
    const lchwt = chiller.points.find((p: { quantity: string }) => p.quantity === "chilled_water_leaving_temp");
    expect(lchwt).toMatchObject({ unit: "degC", brickClass: "Leaving_Chilled_Water_Temperature_Sensor" });
  });

  it("health reports database and broker without tenant data", async () => {
    const body = await (await call("anonymous", "/api/health")).json();
    expect(body).toEqual({ ok: true, status: "ok", db: true, broker: { mode: "embedded", up: true } });
  });
});

describe("pages", () => {
  it("redirect to sign-in without a session", async () => {
    const res = await call("anonymous", `/sites/${OWN_SITE}`);
    expect([302, 303, 307, 308]).toContain(res.status);
    expect(new URL(res.headers.get("location")!, server.url).pathname).toBe("/sign-in");
  });

  it("answer 404 to a customer opening another customer's site", async () => {
    expect((await call("customer", `/sites/${OTHER_SITE}`)).status).toBe(404);
    expect((await call("customer", `/sites/${OWN_SITE}`)).status).toBe(200);
  });
});

describe("API tokens", () => {
  it("work as a bearer token with the owner's scope, record their use, and stop working once revoked", async () => {
    const created = await call("customer", "/api/tokens", {
      method: "POST",
      body: JSON.stringify({ name: "report script" }),
      headers: { "content-type": "application/json" },
    });
    expect(created.status).toBe(201);
    const { token, apiToken } = await created.json();
    expect(token).toMatch(/^llt_/);
    expect(apiToken.lastUsedAt).toBeNull();

    const own = await call({ bearer: token }, `/api/sites/${OWN_SITE}`);
    expect(own.status).toBe(200);
    expect((await call({ bearer: token }, `/api/sites/${OTHER_SITE}`)).status).toBe(404);

    const list = await (await call("customer", "/api/tokens")).json();
    const listed = list.tokens.find((t: { id: string }) => t.id === apiToken.id);
    expect(listed.lastUsedAt).not.toBeNull();
    expect(JSON.stringify(list)).not.toContain(token);

    // another user cannot revoke it
    expect((await call("technician", `/api/tokens/${apiToken.id}`, { method: "DELETE" })).status).toBe(404);
    expect((await call("customer", `/api/tokens/${apiToken.id}`, { method: "DELETE" })).status).toBe(204);
    const after = await call({ bearer: token }, "/api/sites");
    expect(after.status).toBe(401);
  });

  it("a session cookie altered by one character is refused, and a disabled account's session stops on its next request", async () => {
    // The session cookie's value is a sealed token (JWE, base64url parts); one character changed
    // in the middle of it breaks the seal. (The last character of a part may carry only padding
    // bits, so changing that one could leave the token valid.)
    const [name, value] = cookies.technician.split("=");
    const mid = Math.floor(value.length / 2) + (value[Math.floor(value.length / 2)] === "." ? 1 : 0);
    const altered = `${name}=${value.slice(0, mid)}${value[mid] === "A" ? "B" : "A"}${value.slice(mid + 1)}`;
    expect(altered).not.toBe(cookies.technician);
    expect((await fetch(`${server.url}/api/sites`, { headers: { cookie: altered } })).status).toBe(401);
    expect((await call("technician", "/api/sites")).status).toBe(200);
    const db = new Database(server.databasePath);
    try {
      db.prepare("update users set disabled = 1 where email = ?").run(accounts.technician);
      expect((await call("technician", "/api/sites")).status).toBe(401);
    } finally {
      db.prepare("update users set disabled = 0 where email = ?").run(accounts.technician);
      db.close();
    }
    expect((await call("technician", "/api/sites")).status).toBe(200);
  });

  it("can be given an expiry: listed with it, working until then, refused with 401 after", async () => {
    const create = (body: unknown) =>
      call("customer", "/api/tokens", {
        method: "POST",
        body: JSON.stringify(body),
        headers: { "content-type": "application/json" },
      });
    const before = Date.now();
    const created = await create({ name: "month-long script", expiresInDays: 30 });
    expect(created.status).toBe(201);
    const { token, apiToken } = await created.json();
    const expiresMs = Date.parse(apiToken.expiresAt);
    expect(expiresMs - before).toBeGreaterThanOrEqual(30 * 86_400_000);
    expect(expiresMs - before).toBeLessThan(30 * 86_400_000 + 60_000);
    expect((await call({ bearer: token }, `/api/sites/${OWN_SITE}`)).status).toBe(200);
    const listed = (await (await call("customer", "/api/tokens")).json()).tokens.find(
      (t: { id: string }) => t.id === apiToken.id,
    );
    expect(listed.expiresAt).toBe(apiToken.expiresAt);

    // Time passes: the stored expiry is moved into the past.
    const db = new Database(server.databasePath);
    try {
      db.prepare("update api_tokens set expires_at = ? where id = ?").run(Date.now() - 1000, apiToken.id);
    } finally {
      db.close();
    }
    const expired = await call({ bearer: token }, "/api/sites");
    expect(expired.status).toBe(401);
    expect((await expired.json()).error.code).toBe("unauthorized");

    const forever = await (await create({ name: "no expiry" })).json();
    expect(forever.apiToken.expiresAt).toBeNull();
    for (const expiresInDays of [0, 366, 1.5, "30", null])
      expect((await create({ name: "x", expiresInDays })).status).toBe(400);
  });

  it("refuse a made-up token and a malformed header", async () => {
    expect((await call({ bearer: "llt_not-a-real-token" }, "/api/sites")).status).toBe(401);
    expect((await fetch(server.url + "/api/sites", { headers: { authorization: "Basic abc" } })).status).toBe(401);
  });

  it("reject an invalid body with 400 and the field at fault", async () => {
    const res = await call("technician", "/api/tokens", {
      method: "POST",
      body: JSON.stringify({ name: "" }),
      headers: { "content-type": "application/json" },
    });
    expect(res.status).toBe(400);
    const body = await res.json();
    expect(body.error.details[0].path).toBe("name");
    const bad = await call("technician", "/api/tokens", {
      method: "POST",
      body: "{not json",
      headers: { "content-type": "application/json" },
    });
    expect(bad.status).toBe(400);
  });
});
