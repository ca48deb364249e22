import Database from "better-sqlite3";
import fs from "node:fs";
import path from "node:path";
import { io } from "socket.io-client";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { api, raiseChillerTrip } from "../helpers/mqtt";
import { ROOT, signIn, startServer, type TestServer } from "../helpers/server";

// Cross-site request forgery against the real server: a page on another origin (or another port of
// the same host, which is same-site) holding the signed-in user's cookie must change nothing
// (OWASP ASVS 5.0 §3.5.1, §3.5.2; WebSocket handshake §4.4.2).

let server: TestServer;
let admin: string;
const EVIL = "http://evil.example";
const ids: Record<string, string> = {};
let bearer: string;

type Route = { method: string; template: string; file: string };

/** Every state-changing handler under app/api, found by reading the files, so a new route is checked too. */
function stateChangingRoutes(): Route[] {
  const found: Route[] = [];
  const walk = (dir: string) => {
    for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
      const full = path.join(dir, entry.name);
      if (entry.isDirectory()) walk(full);
      else if (entry.name === "route.ts") {
        const source = fs.readFileSync(full, "utf8");
        const segments = path.relative(path.join(ROOT, "app"), dir).split(path.sep);
        const template = "/" + segments.filter((s) => !/^\(.*\)$/.test(s)).join("/");
        const methods = new Set<string>();
        for (const m of source.matchAll(/export\s+(?:const|async\s+function|function)\s+(POST|PUT|PATCH|DELETE)\b/g))
          methods.add(m[1]);
        for (const m of source.matchAll(/export\s*\{([^}]*)\}/g))
          for (const n of m[1].matchAll(/\bas\s+(POST|PUT|PATCH|DELETE)\b/g)) methods.add(n[1]);
        for (const method of methods) found.push({ method, template, file: path.relative(ROOT, full) });
      }
    }
  };
  walk(path.join(ROOT, "app", "api"));
  return found.sort((a, b) => `${a.template} ${a.method}`.localeCompare(`${b.template} ${b.method}`));
}

// next-auth's own endpoints check their double-submit CSRF token themselves.
const isNextAuth = (r: Route) => r.template.startsWith("/api/auth/");
const routes = stateChangingRoutes().filter((r) => !isNextAuth(r));

/** A body each route would act on, so a request that got through would show in the database. */
function bodyFor(r: Route): { type: string; body?: string } {
  const json = (v: unknown) => ({ type: "application/json", body: JSON.stringify(v) });
  const key = `${r.method} ${r.template}`;
  switch (key) {
    case "POST /api/alarms/[alarmId]/ack":
      return json({ note: "forged" });
    case "POST /api/alarms/[alarmId]/notes":
      return json({ text: "forged", visibility: "customer" });
    case "POST /api/alarms/[alarmId]/shelve":
      return json({ minutes: 60, reason: "forged" });
    case "POST /api/alarms/[alarmId]/unshelve":
      return json({ note: "forged" });
    case "POST /api/gateways":
      return json({ siteId: "harborview-mob", name: "Forged gateway", protocol: "json" });
    case "PUT /api/gateways/[gatewayId]/point-map":
      return { type: "text/csv", body: "gateway_point,equipment,quantity,unit\nX,CH-1,compressor_power,kW\n" };
    case "POST /api/oncall":
      return json({
        startsAt: new Date(Date.now() + 86_400_000).toISOString(),
        endsAt: new Date(Date.now() + 2 * 86_400_000).toISOString(),
        primaryUserId: ids.userId,
      });
    case "PUT /api/sites/[siteId]/rule-settings":
      return json({ crossoverRisk: { warnTimeToCrossoverS: 1234 } });
    case "POST /api/simulator/[siteId]":
      return json({ scenario: "power-blip", speed: 60 });
    case "POST /api/simulator/[siteId]/drill":
      return json({ type: "reset-alarm", equipment: "CH-1" });
    case "POST /api/drills":
      return json({
        siteId: "training-forged",
        traineeId: ids.userId,
        scenario: "power-blip",
        speed: 600,
        hints: true,
      });
    case "POST /api/drills/[drillId]/commands":
      return json({ type: "set-fan-drive-mode", equipment: "CT-1", mode: "auto" });
    case "POST /api/training-sites":
      return json({ name: "Forged training site", layout: "default" });
    case "POST /api/saved-scenarios":
      return json({ siteId: "harborview-mob", atMs: Date.now(), name: "forged", base: "power-blip" });
    case "POST /api/tokens":
      return json({ name: "forged" });
    case "POST /api/people":
      return json({ email: "forged@evil.example", name: "Forged", role: "admin" });
    case "PATCH /api/people/[userId]":
      return json({ disabled: true });
    case "PATCH /api/account":
      return json({ name: "Forged name" });
    case "POST /api/account/password":
      return json({ currentPassword: "wrong", newPassword: "a forged new passphrase" });
    case "POST /api/password-reset":
      return json({ email: "admin@tallgrass.example" });
    case "POST /api/account-links/[token]":
      return json({ password: "a forged new passphrase" });
    default:
      return { type: "application/json" };
  }
}

function urlFor(r: Route): string {
  return r.template.replace(/\[([^\]]+)\]/g, (_, name: string) => {
    const value = ids[name];
    if (!value) throw new Error(`${r.file}: no test value for [${name}]; add one to ids so the route is checked`);
    return encodeURIComponent(value);
  });
}

function send(r: Route, headers: Record<string, string>, type?: string): Promise<Response> {
  const { type: ownType, body } = bodyFor(r);
  return fetch(server.url + urlFor(r), {
    method: r.method,
    headers: { cookie: admin, "content-type": type ?? ownType, ...headers },
    body,
  });
}

function query<T>(sql: string, ...args: unknown[]): T[] {
  const db = new Database(server.databasePath, { readonly: true });
  try {
    return db.prepare(sql).all(...args) as T[];
  } finally {
    db.close();
  }
}

/** Every row of every table, so "nothing changed" is checked without knowing what a route touches. */
function snapshot(): Record<string, string> {
  const db = new Database(server.databasePath, { readonly: true });
  try {
    // The store's own bookkeeping, latest values and rollups are written behind ingestion; no route writes them.
    const tables = (
      db
        .prepare("select name from sqlite_master where type = 'table' and name not like 'sqlite_%' order by name")
        .all() as { name: string }[]
    ).filter(({ name }) => name !== "ingest_state" && name !== "latest_values" && !/^readings_1[mh]$/.test(name));
    // The rules keep raising other alarms as the test gateway's data ages: alarm rows are the target's only.
    const scope = (name: string) => {
      if (name === "alarms") return " where id = ?";
      // Incidents are filed from the background alarms too: only the target alarm's count.
      if (name === "incidents") return " where id in (select incident_id from incident_alarms where alarm_id = ?)";
      // Escalations of other alarms go on mailing in the background; a forged invitation or reset would not.
      if (name === "mail_messages")
        return " where subject in ('Liftline: you are invited', 'Liftline: reset your password')";
      const columns = db.prepare(`pragma table_info("${name}")`).all() as { name: string }[];
      return columns.some((c) => c.name === "alarm_id") ? " where alarm_id = ?" : "";
    };
    // Some tables have no rowid: rows are compared as a sorted list.
    const rows = (name: string) => {
      const where = scope(name);
      const all = db
        .prepare(`select * from "${name}"${where}`)
        .all(...(where.includes("?") ? [ids.alarmId] : [])) as unknown[];
      return all.map((r) => JSON.stringify(r)).sort();
    };
    return Object.fromEntries(tables.map(({ name }) => [name, rows(name).join("\n")]));
  } finally {
    db.close();
  }
}

/** A snapshot once the test gateway's readings have been written behind (latest values, counters). */
async function settledSnapshot(): Promise<Record<string, string>> {
  let last = snapshot();
  for (let i = 0; i < 30; i++) {
    await new Promise((r) => setTimeout(r, 1000));
    const now = snapshot();
    if (JSON.stringify(now) === JSON.stringify(last)) return now;
    last = now;
  }
  throw new Error("the database did not settle");
}

beforeAll(async () => {
  server = await startServer();
  admin = (await signIn(server.url, "admin@tallgrass.example")).cookie!;
  ids.alarmId = await raiseChillerTrip(server, admin, "harborview-mob", "CH-1", "High condenser pressure");
  const gw = await api(server, admin, "/api/gateways", {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify({ siteId: "harborview-mob", name: "Target", protocol: "json" }),
  });
  ids.gatewayId = gw.body.gateway.id;
  const token = await api(server, admin, "/api/tokens", {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify({ name: "target" }),
  });
  ids.tokenId = token.body.apiToken.id;
  // A second token for the bearer checks: the pass from the app's own origin revokes the first.
  const script = await api(server, admin, "/api/tokens", {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify({ name: "script" }),
  });
  bearer = script.body.token;
  const oncall = await api(server, admin, "/api/oncall");
  ids.shiftId = oncall.body.shifts[0].id;
  ids.userId = oncall.body.people[0].id;
  ids.siteId = "harborview-mob";
  // No drill exists: a forged request must change nothing whichever way it is refused.
  ids.drillId = "drill-none";
  ids.token = "not-a-real-ack-link-token";
  // Records no one has: a request that got through answers 404 and changes nothing, and the check
  // that matters here (403 before any handler runs) does not depend on the record existing.
  Object.assign(ids, {
    customerId: "org-no-such-customer",
    equipmentId: "no-such-site:CH-9",
    pointId: "999999",
    fileId: "00000000000000000000000000000000",
    changeId: "no-such-change",
    requestId: "no-such-request",
    visitId: "no-such-visit",
    incidentId: "no-such-incident",
    feedId: "no-such-feed",
    subscriptionId: "no-such-subscription",
    priority: "4",
  });
});
afterAll(() => server?.stop());

describe("state-changing API routes", () => {
  it("are found by walking app/api (next-auth's own endpoints aside)", () => {
    expect(
      stateChangingRoutes()
        .filter(isNextAuth)
        .map((r) => r.template),
    ).toEqual(["/api/auth/[...nextauth]"]);
    // The 15 routes of the finding, some with two methods; a new one joins the checks below by itself.
    expect(new Set(routes.map((r) => r.template)).size).toBeGreaterThanOrEqual(15);
  });

  it("refuse a cookie request from another origin, another port, or with no provenance, and change nothing", async () => {
    const before = await settledSnapshot();
    const otherPort = `http://localhost:${server.port + 1}`;
    const forged: Array<[string, Record<string, string>, string | undefined]> = [
      // A cross-site form or fetch needs no preflight for text/plain (Fetch Standard: CORS-safelisted request-header).
      ["foreign Origin, text/plain", { origin: EVIL }, "text/plain"],
      ["foreign Origin, the route's own type", { origin: EVIL }, undefined],
      ["same host, other port", { origin: otherPort }, "text/plain"],
      ["opaque Origin", { origin: "null" }, undefined],
      // W3C Fetch Metadata §2.4: same-site covers other ports of the host; only same-origin passes.
      ["no Origin, Sec-Fetch-Site: same-site", { "sec-fetch-site": "same-site" }, undefined],
      ["no Origin, Sec-Fetch-Site: cross-site", { "sec-fetch-site": "cross-site" }, "text/plain"],
      ["neither Origin nor Sec-Fetch-Site", {}, undefined],
    ];
    const answers: string[] = [];
    for (const r of routes) {
      for (const [label, headers, type] of forged) {
        const res = await send(r, headers, type);
        answers.push(`${r.method} ${r.template}, ${label}: ${res.status} ${await res.text()}`);
      }
    }
    const after = snapshot();
    expect(Object.keys(before).filter((table) => after[table] !== before[table])).toEqual([]);
    const refused = `403 ${JSON.stringify({ error: { code: "forbidden", message: "Cross-site request refused." } })}`;
    expect(answers.filter((a) => !a.endsWith(`: ${refused}`))).toEqual([]);
  }, 300_000);

  it("accept the same requests from the app's own origin", async () => {
    for (const r of routes) {
      const res = await send(r, { origin: server.url });
      expect(res.status, `${r.method} ${r.template}: ${await res.clone().text()}`).not.toBe(403);
    }
    // Sec-Fetch-Site stands in for a missing Origin (W3C Fetch Metadata §2.4).
    const viaFetchMetadata = await send(
      { method: "POST", template: "/api/tokens", file: "" },
      { "sec-fetch-site": "same-origin" },
    );
    expect(viaFetchMetadata.status).toBe(201);
  }, 300_000);

  it("accept an API token from anywhere: it is never sent by a browser on its own", async () => {
    const post = (headers: Record<string, string>) =>
      fetch(`${server.url}/api/alarms/${ids.alarmId}/notes`, {
        method: "POST",
        headers: { authorization: `Bearer ${bearer}`, "content-type": "application/json", ...headers },
        body: JSON.stringify({ text: "from a script", visibility: "internal" }),
      });
    expect((await post({})).status).toBe(201);
    expect((await post({ origin: EVIL })).status).toBe(201);
  });

  it("answer 415 to a JSON route sent another media type (RFC 9110 §15.5.16)", async () => {
    const tokenNames = () => query<{ name: string }>("select name from api_tokens").map((t) => t.name);
    for (const type of ["text/plain", "application/x-www-form-urlencoded", "multipart/form-data; boundary=x"]) {
      const res = await fetch(`${server.url}/api/tokens`, {
        method: "POST",
        headers: { cookie: admin, origin: server.url, "content-type": type },
        body: JSON.stringify({ name: "sent as text" }),
      });
      expect(res.status, type).toBe(415);
      expect((await res.json()).error).toEqual({
        code: "unsupported_media_type",
        message: "Send the body as JSON, with Content-Type: application/json.",
      });
    }
    const scripted = await fetch(`${server.url}/api/tokens`, {
      method: "POST",
      headers: { authorization: `Bearer ${bearer}` },
      body: JSON.stringify({ name: "no content type" }),
    });
    expect(scripted.status).toBe(415);
    expect(tokenNames()).not.toContain("sent as text");
    expect(tokenNames()).not.toContain("no content type");
    // With a charset parameter it is still JSON.
    const ok = await fetch(`${server.url}/api/tokens`, {
      method: "POST",
      headers: { cookie: admin, origin: server.url, "content-type": "application/json; charset=utf-8" },
      body: JSON.stringify({ name: "with charset" }),
    });
    expect(ok.status).toBe(201);
  });
});

describe("socket.io handshake", () => {
  const connect = (extraHeaders: Record<string, string>, transports: ("websocket" | "polling")[] = ["websocket"]) =>
    new Promise<string>((resolve) => {
      const socket = io(server.url, {
        extraHeaders: { cookie: admin, ...extraHeaders },
        transports,
        reconnection: false,
      });
      socket.once("connect", () => {
        socket.disconnect();
        resolve("connected");
      });
      socket.once("connect_error", (err) => {
        socket.disconnect();
        resolve(err.message);
      });
    });

  it("refuses a signed-in socket opened from another origin or with no provenance (OWASP ASVS 5.0 §4.4.2)", async () => {
    expect(await connect({ origin: EVIL })).toBe("forbidden");
    expect(await connect({ origin: `http://localhost:${server.port + 1}` })).toBe("forbidden");
    expect(await connect({})).toBe("forbidden");
    expect(await connect({ "sec-fetch-site": "same-site" }, ["polling"])).toBe("forbidden");
  });

  it("admits the app's own pages: Origin on the WebSocket, Sec-Fetch-Site on a same-origin polling handshake", async () => {
    expect(await connect({ origin: server.url })).toBe("connected");
    expect(await connect({ "sec-fetch-site": "same-origin" }, ["polling"])).toBe("connected");
  });
});

describe("server actions", () => {
  // Next.js checks a server action's Origin against the Host header itself (Next.js docs, "Data
  // Security": allowedOrigins); this verifies it for the one action, the settings page's unit choice.
  async function postUnitChoice(origin: string, unitSystem: "si" | "ip"): Promise<number> {
    const page = await (await fetch(`${server.url}/settings`, { headers: { cookie: admin } })).text();
    // The form's hidden action fields, as the browser would send them (their shape differs between
    // development and production builds).
    const unescape = (v: string) =>
      v
        .replace(/&quot;/g, '"')
        .replace(/&#x27;/g, "'")
        .replace(/&lt;/g, "<")
        .replace(/&gt;/g, ">")
        .replace(/&amp;/g, "&");
    const fields = [...page.matchAll(/<input type="hidden" name="(\$ACTION[^"]*)"(?: value="([^"]*)")?/g)];
    expect(fields.length, "the settings form carries its action fields").toBeGreaterThan(0);
    const form = new FormData();
    for (const [, name, value] of fields) form.set(name, unescape(value ?? ""));
    form.set("unitSystem", unitSystem);
    const res = await fetch(`${server.url}/settings`, {
      method: "POST",
      headers: { cookie: admin, origin },
      body: form,
      redirect: "manual",
    });
    await res.arrayBuffer();
    return res.status;
  }
  const unitSystem = () =>
    query<{ u: string }>("select unit_system as u from users where email = ?", "admin@tallgrass.example")[0].u;

  it("refuse a form post from another origin and accept the app's own", async () => {
    const start = unitSystem();
    const other = start === "si" ? "ip" : "si";
    await postUnitChoice(EVIL, other);
    expect(unitSystem()).toBe(start);
    await postUnitChoice(server.url, other);
    expect(unitSystem()).toBe(other);
  }, 120_000);
});
