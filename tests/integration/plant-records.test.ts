import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { signIn, startServer, type TestServer } from "../helpers/server";
import {
  adminCookie,
  api,
  connectGateway,
  endClient,
  provisionGateway,
  putPointMap,
  raiseChillerTrip,
  rawMqtt,
  waitFor,
} from "../helpers/mqtt";

// Customers, sites and equipment records through the real API: validation by field, 401/403/404,
// the audit entry, retiring (off the lists and the board, gateways refused), and chiller limits
// the rules take up at once.

let server: TestServer;
let admin: string;
let tech: string;
let harborview: string;
let millbrook: string;

const json = (method: string, body: unknown): RequestInit => ({
  method,
  headers: { "content-type": "application/json" },
  body: JSON.stringify(body),
});

async function cookieOf(email: string) {
  const { cookie } = await signIn(server.url, email);
  if (!cookie) throw new Error(`sign-in failed for ${email}`);
  return cookie;
}

const goodSite = {
  customerId: "org-harborview",
  name: "Harborview Annex",
  kind: "Medical office",
  address: "1460 Larkspur Avenue, Riverton",
  timeZone: "America/Chicago",
  contacts: [{ name: "Morgan Ellis", role: "Facilities", phone: "555-0142", email: "m@harborview.example" }],
  accessNotes: "Key at the security desk.",
};

beforeAll(async () => {
  server = await startServer();
  admin = await adminCookie(server);
  tech = await cookieOf("luis@tallgrass.example");
  harborview = await cookieOf("facilities@harborview.example");
  millbrook = await cookieOf("facilities@millbrook.example");
}, 180_000);

afterAll(async () => {
  await server?.stop();
});

describe("customers", () => {
  it("401 without a session; technicians read all, customers only their own", async () => {
    expect((await fetch(`${server.url}/api/customers`)).status).toBe(401);
    const all = await api(server, tech, "/api/customers");
    expect(all.status).toBe(200);
    expect(all.body.customers.map((c: { id: string }) => c.id).sort()).toEqual([
      "org-harborview",
      "org-millbrook",
      "org-quarry-ridge",
    ]);
    const own = await api(server, harborview, "/api/customers");
    expect(own.body.customers.map((c: { id: string }) => c.id)).toEqual(["org-harborview"]);
    expect((await api(server, harborview, "/api/customers/org-millbrook")).status).toBe(404);
  });

  it("creates with an audit entry; validation errors come back by field; staff other than admins get 403", async () => {
    const bad = await api(server, admin, "/api/customers", json("POST", { name: "" }));
    expect(bad.status).toBe(400);
    expect(bad.body.error.details).toEqual([expect.objectContaining({ path: "name" })]);
    expect((await api(server, tech, "/api/customers", json("POST", { name: "Nope" }))).status).toBe(403);
    expect((await api(server, harborview, "/api/customers", json("POST", { name: "Nope" }))).status).toBe(403);
    const made = await api(server, admin, "/api/customers", json("POST", { name: "Lakeshore Clinics" }));
    expect(made.status).toBe(201);
    const id = made.body.customer.id;
    const renamed = await api(server, admin, `/api/customers/${id}`, json("PATCH", { name: "Lakeshore Clinics Inc" }));
    expect(renamed.body.customer.name).toBe("Lakeshore Clinics Inc");
    expect((await api(server, tech, `/api/customers/${id}`, json("PATCH", { name: "x" }))).status).toBe(403);
  });
});

describe("sites", () => {
  it("checks the time zone against the IANA list and reports errors by field", async () => {
    const bad = await api(server, admin, "/api/sites", json("POST", { ...goodSite, timeZone: "Mars/Olympus" }));
    expect(bad.status).toBe(400);
    expect(bad.body.error.details.map((d: { path: string }) => d.path)).toEqual(["timeZone"]);
    const email = await api(
      server,
      admin,
      "/api/sites",
      json("POST", { ...goodSite, contacts: [{ name: "A", email: "not-an-address" }] }),
    );
    expect(email.body.error.details.map((d: { path: string }) => d.path)).toEqual(["contacts.0.email"]);
  });

  it("403 for technician and customer writes, 404 for another customer's site", async () => {
    expect((await api(server, tech, "/api/sites", json("POST", goodSite))).status).toBe(403);
    expect((await api(server, harborview, "/api/sites", json("POST", goodSite))).status).toBe(403);
    expect((await api(server, harborview, "/api/sites/harborview-mob", json("PATCH", { name: "x" }))).status).toBe(403);
    expect((await api(server, millbrook, "/api/sites/harborview-mob", json("PATCH", { name: "x" }))).status).toBe(404);
    expect((await api(server, millbrook, "/api/sites/harborview-mob", { method: "DELETE" })).status).toBe(404);
    expect((await api(server, millbrook, "/api/sites/harborview-mob/equipment")).status).toBe(404);
    expect((await api(server, millbrook, "/api/equipment/harborview-mob:CH-1")).status).toBe(404);
  });

  it("creates, edits with before → after in the audit, and retiring hides it, stops its board entry and refuses its gateway", async () => {
    const made = await api(server, admin, "/api/sites", json("POST", goodSite));
    expect(made.status).toBe(201);
    const siteId = made.body.site.id as string;
    const edited = await api(
      server,
      admin,
      `/api/sites/${siteId}`,
      json("PATCH", { accessNotes: "Gate code: ask security." }),
    );
    expect(edited.status).toBe(200);
    expect(edited.body.site.accessNotes).toBe("Gate code: ask security.");
    expect(edited.body.site.contacts).toEqual(goodSite.contacts);

    const gw = await provisionGateway(server, admin, { siteId });
    const client = await connectGateway(server, gw);
    await endClient(client);

    const retired = await api(server, admin, `/api/sites/${siteId}`, { method: "DELETE" });
    expect(retired.status).toBe(200);
    expect(retired.body.site.retiredAtMs).toEqual(expect.any(Number));
    const list = await api(server, tech, "/api/sites");
    expect(list.body.sites.map((s: { id: string }) => s.id)).not.toContain(siteId);
    const withRetired = await api(server, admin, "/api/sites?includeRetired=1");
    expect(withRetired.body.sites.map((s: { id: string }) => s.id)).toContain(siteId);
    // The board page lists the same sites as /api/sites.
    const board = await fetch(`${server.url}/`, { headers: { cookie: tech } });
    expect(await board.text()).not.toContain(goodSite.name);

    // MQTT 3.1.1 §3.2.2.3: return code 5, not authorized — as for a revoked gateway.
    const raw = await rawMqtt(server);
    raw.send({
      cmd: "connect",
      protocolId: "MQTT",
      protocolVersion: 4,
      clean: true,
      keepalive: 30,
      clientId: gw.username,
      username: gw.username,
      password: Buffer.from(gw.password),
    });
    expect(await raw.connack()).toBe(5);
    raw.socket.destroy();

    // The audit trail is an admin's: these changes, from → to. (Read directly until its page exists.)
    const { default: Database } = await import("better-sqlite3");
    const db = new Database(server.databasePath, { readonly: true });
    const rows = db
      .prepare("select action, before, after from audit_log where entity_type = 'site' and entity_id = ? order by id")
      .all(siteId) as { action: string; before: string | null; after: string | null }[];
    db.close();
    expect(rows.map((r) => r.action)).toEqual(["create", "update", "retire"]);
    expect(JSON.parse(rows[1].before!).accessNotes).toBe(goodSite.accessNotes);
    expect(JSON.parse(rows[1].after!).accessNotes).toBe("Gate code: ask security.");
  });
});

describe("equipment", () => {
  it("adds a pump serving a chiller, refuses a duplicate tag and a serves that names no chiller, by field", async () => {
    const pump = {
      kind: "pump",
      tag: "CHWP-9",
      name: "Standby chilled water pump",
      designFlowLps: 45,
      designHeadKPa: 150,
      loop: "chilled_water",
      serves: "CH-1",
    };
    const made = await api(server, admin, "/api/sites/harborview-mob/equipment", json("POST", pump));
    expect(made.status).toBe(201);
    expect(made.body.equipment.record).toMatchObject({ designFlowLps: 45, designHeadKPa: 150, loop: "chilled_water" });
    const dup = await api(server, admin, "/api/sites/harborview-mob/equipment", json("POST", pump));
    expect(dup.status).toBe(409);
    expect(dup.body.error.details).toEqual([expect.objectContaining({ path: "tag" })]);
    const wrongServes = await api(
      server,
      admin,
      "/api/sites/harborview-mob/equipment",
      json("POST", { ...pump, tag: "CHWP-8", serves: "CT-1" }),
    );
    expect(wrongServes.status).toBe(400);
    expect(wrongServes.body.error.details).toEqual([expect.objectContaining({ path: "serves" })]);
    const badKind = await api(
      server,
      admin,
      "/api/sites/harborview-mob/equipment",
      json("POST", { kind: "chiller", tag: "CH-9", name: "x", refrigerant: "R-22", compressorType: "screw" }),
    );
    expect(badKind.status).toBe(400);
    expect(badKind.body.error.details.map((d: { path: string }) => d.path)).toContain("refrigerant");
    expect(
      (await api(server, tech, "/api/sites/harborview-mob/equipment", json("POST", { ...pump, tag: "CHWP-7" }))).status,
    ).toBe(403);

    const id = made.body.equipment.id;
    expect(
      (await api(server, admin, `/api/equipment/${id}`, json("PATCH", { designHeadKPa: 160 }))).body.equipment.record
        .designHeadKPa,
    ).toBe(160);
    expect((await api(server, admin, `/api/equipment/${id}`, { method: "DELETE" })).status).toBe(200);
    const site = await api(server, tech, "/api/sites/harborview-mob");
    expect(site.body.site.equipment.map((e: { tag: string }) => e.tag)).not.toContain("CHWP-9");
  });

  it("a chiller takes capacity in kW and stores tons (1 ton = 3.516853 kW, REFERENCES.md units)", async () => {
    const made = await api(
      server,
      admin,
      "/api/sites/millbrook-high/equipment",
      json("POST", {
        kind: "chiller",
        tag: "CH-9",
        name: "Chiller 9",
        capacityKW: 1055.06,
        refrigerant: "R-134a",
        compressorType: "centrifugal_vsd",
      }),
    );
    expect(made.status).toBe(201);
    expect(made.body.equipment.record.capacityTons).toBeCloseTo(300, 1);
    expect(made.body.equipment.limits.highCondPressureCutoutKPa.source).toBe("default");
    await api(server, admin, `/api/equipment/${made.body.equipment.id}`, { method: "DELETE" });
  });

  it("limits: validated per key and together, audited, 403 for technicians, null goes back to the default", async () => {
    const url = "/api/equipment/harborview-mob:CH-1/limits";
    const range = await api(server, admin, url, json("PUT", { values: { highCondPressureCutoutKPa: 50 } }));
    expect(range.status).toBe(400);
    expect(range.body.error.details[0].path).toBe("values.highCondPressureCutoutKPa");
    const cross = await api(server, admin, url, json("PUT", { values: { startToStartS: 60 } }));
    expect(cross.status).toBe(400);
    expect(cross.body.error.details).toEqual([expect.objectContaining({ path: "values.startToStartS" })]);
    expect((await api(server, tech, url, json("PUT", { values: { startToStartS: 1200 } }))).status).toBe(403);
    expect((await api(server, millbrook, url, json("PUT", { values: { startToStartS: 1200 } }))).status).toBe(404);

    const set = await api(server, admin, url, json("PUT", { values: { startToStartS: 1200 } }));
    expect(set.status).toBe(200);
    const got = await api(server, tech, "/api/equipment/harborview-mob:CH-1");
    expect(got.body.equipment.limits.startToStartS).toMatchObject({ value: 1200, source: "entered" });
    expect(got.body.equipment.limits.startToStartS.setAtMs).toEqual(expect.any(Number));
    const cleared = await api(server, admin, url, json("PUT", { values: { startToStartS: null } }));
    expect(cleared.body.equipment.limits.startToStartS).toMatchObject({ value: 900, source: "default" });
  });

  it("equipment routes take the id percent-encoded, as the pages' links and forms send its colon (%3A)", async () => {
    const encoded = encodeURIComponent("harborview-mob:CH-1");
    expect(encoded).toBe("harborview-mob%3ACH-1");
    const got = await api(server, tech, `/api/equipment/${encoded}`);
    expect(got.status).toBe(200);
    expect(got.body.equipment.id).toBe("harborview-mob:CH-1");
    expect((await api(server, tech, `/api/equipment/${encoded}/points`)).status).toBe(200);
    const set = await api(
      server,
      admin,
      `/api/equipment/${encoded}/limits`,
      json("PUT", { values: { stopToStartS: 240 } }),
    );
    expect(set.status).toBe(200);
    expect(set.body.equipment.limits.stopToStartS).toMatchObject({ value: 240, source: "entered" });
    const cleared = await api(
      server,
      admin,
      `/api/equipment/${encoded}/limits`,
      json("PUT", { values: { stopToStartS: null } }),
    );
    expect(cleared.body.equipment.limits.stopToStartS).toMatchObject({ value: 180, source: "default" });
  });
});

describe("head_pressure_near_trip follows the chiller's cut-out", () => {
  it("Changing a chiller's high-pressure cut-out changes the head_pressure_near_trip threshold for that chiller only, at once, without losing the site's history", async () => {
    const siteId = "quarry-ridge-dh2";
    // Earlier history of the site: a latched trip on CH-2.
    const earlierAlarmId = await raiseChillerTrip(server, admin, siteId, "CH-2", "High condenser pressure");

    const gw = await provisionGateway(server, admin, { siteId });
    const map = await putPointMap(
      server,
      admin,
      gw.gateway.id,
      [
        "gateway_point,equipment,quantity,unit",
        "CH1-CP,CH-1,condenser_refrigerant_pressure,kPa",
        "CH1-RUN,CH-1,run_status,bool",
        "CH2-CP,CH-2,condenser_refrigerant_pressure,kPa",
        "CH2-RUN,CH-2,run_status,bool",
      ].join("\n"),
    );
    expect(map.status).toBe(200);
    const client = await connectGateway(server, gw);
    let seq = 0;
    // Both running, pressure rising 10 kPa/min: CH-1 (R-134a) from 800 kPa, CH-2 (R-1234ze(E)) from 600 kPa —
    // each far below its default cut-out (1204.5 kPa and ≈ 910 kPa abs; 160 psig-equivalent, recalled).
    const publish = async (fromMs: number, toMs: number) => {
      for (let ts = fromMs; ts <= toMs; ts += 10_000) {
        const t = (ts - start) / 60_000;
        const at = new Date(ts).toISOString();
        await client.publishAsync(
          `liftline/${gw.gateway.id}/readings`,
          JSON.stringify({
            seq: seq++,
            sentAt: at,
            readings: [
              { point: "CH1-CP", value: 800 + 10 * t, ts: at },
              { point: "CH1-RUN", value: true, ts: at },
              { point: "CH2-CP", value: 600 + 10 * t, ts: at },
              { point: "CH2-RUN", value: true, ts: at },
            ],
          }),
          { qos: 1 },
        );
      }
    };
    // Rules run on the readings' own times (lib/rules/schedule.ts): the warning's 15 s on-delay is passed
    // by readings after the change, so the plant keeps reporting for a while after it.
    const start = Date.now() - 300_000;
    await publish(start, start + 180_000);
    const headAlarms = async () => {
      const { body } = await api(server, admin, `/api/alarms?site=${siteId}`);
      return (body.alarms as { ruleId: string; equipment: string }[]).filter(
        (a) => a.ruleId === "head_pressure_near_trip",
      );
    };
    expect(await headAlarms()).toEqual([]);

    // Lower CH-1's cut-out below its present ≈ 830 kPa: within 150 kPa and rising → near trip.
    const set = await api(
      server,
      admin,
      "/api/equipment/quarry-ridge-dh2:CH-1/limits",
      json("PUT", { values: { highCondPressureCutoutKPa: 820 } }),
    );
    expect(set.status).toBe(200);
    // Live from here: the earlier trip's readings set the site's clock to now, and the rules do not go back
    // to readings older than their last evaluation (lib/rules/schedule.ts); 20 s of the plant reporting
    // passes the warning's 15 s on-delay.
    const liveFrom = Date.now();
    for (let i = 0; i <= 4; i++) {
      await publish(liveFrom + i * 5_000, liveFrom + i * 5_000);
      if (i < 4) await new Promise((r) => setTimeout(r, 5_000));
    }
    const raised = await waitFor(async () => {
      const list = await headAlarms();
      return list.length ? list : undefined;
    }, 15_000);
    expect(raised.map((a) => a.equipment)).toEqual(["CH-1"]);
    await endClient(client);

    const detail = await api(server, admin, `/api/alarms?site=${siteId}`);
    const ids = (detail.body.alarms as { id: string }[]).map((a) => a.id);
    expect(ids).toContain(earlierAlarmId);
  }, 60_000);
});
