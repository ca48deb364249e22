import Database from "better-sqlite3";
import { Parser } from "n3";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { pointsByKind } from "@/lib/quantities";
import { provisionGateway, putPointMap } from "../helpers/mqtt";
import { signIn, startServer, type TestServer } from "../helpers/server";

// Points and the site point list through the real API: who may read and write (401/403/404 as
// for the other routes), validation errors by field and by line and column, the audit entry in
// the same transaction, a preview that changes nothing, an apply that does everything.

let server: TestServer;
const cookies: Record<string, string> = {};
const accounts = {
  admin: "admin@tallgrass.example",
  technician: "luis@tallgrass.example",
  customer: "facilities@harborview.example",
} as const;
type Who = keyof typeof accounts | "anonymous";

const OWN_SITE = "harborview-mob"; // the customer's own site
const OTHER_SITE = "quarry-ridge-dh2"; // another customer's
const HEADER = "equipment_tag, equipment_kind, quantity, unit, expected_interval_s, low_limit, high_limit";

async function call(who: Who, path: string, init: RequestInit = {}) {
  const headers = new Headers(init.headers);
  if (who !== "anonymous") {
    headers.set("cookie", cookies[who]);
    headers.set("origin", server.url); // as a browser's page would (lib/server/origin.ts)
  }
  const res = await fetch(server.url + path, { ...init, headers, redirect: "manual" });
  const text = await res.text();
  let body: ReturnType<typeof JSON.parse> = text;
  try {
    body = JSON.parse(text);
  } catch {
    // text bodies (CSV, Turtle) stay text
  }
  return { status: res.status, body, headers: res.headers };
}
const json = (method: string, body: unknown): RequestInit => ({
  method,
  headers: { "content-type": "application/json" },
  body: JSON.stringify(body),
});
const csv = (body: string): RequestInit => ({ method: "POST", headers: { "content-type": "text/csv" }, body });

function db() {
  return new Database(server.databasePath, { readonly: true });
}
function auditFor(entityId: string) {
  const d = db();
  try {
    return d
      .prepare(
        "select action, entity_type, actor_name, before, after from audit_log where entity_type = 'point' and entity_id = ? order by id",
      )
      .all(entityId) as Array<{
      action: string;
      entity_type: string;
      actor_name: string;
      before: string;
      after: string;
    }>;
  } finally {
    d.close();
  }
}

beforeAll(async () => {
  server = await startServer();
  for (const [role, email] of Object.entries(accounts)) {
    const res = await signIn(server.url, email);
    expect(res.cookie, `sign-in of ${role}`).toBeTruthy();
    cookies[role] = res.cookie!;
  }
  // Equipment without points (records have their own API; written here so these tests stand alone).
  const d = new Database(server.databasePath);
  try {
    const insert = d.prepare("insert into equipment (id, site_id, tag, name, kind) values (?, ?, ?, ?, ?)");
    insert.run(`${OWN_SITE}:AHU-9`, OWN_SITE, "AHU-9", "Air handler 9", "air_handler");
    insert.run(`${OWN_SITE}:WS-9`, OWN_SITE, "WS-9", "Weather station 9", "weather_station");
  } finally {
    d.close();
  }
}, 240_000);
afterAll(async () => {
  await server?.stop();
});

describe("points per equipment", () => {
  const WS = `${OWN_SITE}:WS-9`;
  const path = `/api/equipment/${encodeURIComponent(WS)}/points`;
  const demoAhu = `/api/equipment/${encodeURIComponent(`${OWN_SITE}:AHU-1`)}/points`;

  it("lists points to staff and the owning customer; 401 signed out, 404 for another customer's", async () => {
    expect((await call("anonymous", demoAhu)).status).toBe(401);
    for (const who of ["admin", "technician", "customer"] as const) {
      const res = await call(who, demoAhu);
      expect(res.status, who).toBe(200);
      expect(res.body.points.map((p: { quantity: string }) => p.quantity).sort()).toEqual(
        [...pointsByKind.air_handler].sort(),
      );
    }
    const other = `/api/equipment/${encodeURIComponent(`${OTHER_SITE}:CH-1`)}/points`;
    expect((await call("customer", other)).status).toBe(404);
    expect((await call("technician", other)).status).toBe(200);
  });

  it("refuses writes by technicians and customers (403), another customer's equipment (404)", async () => {
    const body = { quantity: "outdoor_air_temp" };
    expect((await call("technician", path, json("POST", body))).status).toBe(403);
    expect((await call("customer", path, json("POST", body))).status).toBe(403);
    const other = `/api/equipment/${encodeURIComponent(`${OTHER_SITE}:AHU-1`)}/points`;
    expect((await call("customer", other, json("POST", body))).status).toBe(404);
    expect((await call("anonymous", path, json("POST", body))).status).toBe(401);
  });

  it("answers validation errors by field", async () => {
    const bad = await call(
      "admin",
      path,
      json("POST", { quantity: "chilled_water_supply_temp", expectedIntervalS: 0 }),
    );
    expect(bad.status).toBe(400);
    const fields = bad.body.error.details.map((d: { path: string }) => d.path).sort();
    expect(fields).toEqual(["expectedIntervalS", "quantity"]);
    const unit = await call("admin", path, json("POST", { quantity: "outdoor_air_temp", unit: "psig" }));
    expect(unit.status).toBe(400);
    expect(unit.body.error.details).toEqual([
      { path: "unit", message: expect.stringMatching(/cannot measure temperature/) },
    ]);
    const order = await call(
      "admin",
      path,
      json("POST", { quantity: "outdoor_air_humidity", lowLimit: 90, highLimit: 10 }),
    );
    expect(order.status).toBe(400);
    expect(order.body.error.details[0].path).toBe("highLimit");
    const kind = await call("admin", path, json("POST", { quantity: "drive_temp" }));
    expect(kind.status).toBe(400);
    expect(kind.body.error.details).toEqual([
      { path: "quantity", message: expect.stringMatching(/weather_station has no drive_temp/) },
    ]);
    const dup = await call("admin", demoAhu, json("POST", { quantity: "run_status" }));
    expect(dup.status).toBe(409);
  });

  it("adds, edits and removes a point, with limits stored in canonical units and an audit entry each", async () => {
    // 40–60 °F → 4.444…–15.555… °C: t/°C = (t/°F − 32)/1.8 (NIST SP 811 B.8).
    const created = await call(
      "admin",
      path,
      json("POST", { quantity: "outdoor_air_temp", unit: "degF", expectedIntervalS: 30, lowLimit: 40, highLimit: 60 }),
    );
    expect(created.status).toBe(201);
    const point = created.body.point;
    expect(point).toMatchObject({
      quantity: "outdoor_air_temp",
      unit: "degC",
      expectedIntervalS: 30,
      equipmentTag: "WS-9",
    });
    expect(point.brickClass).toBe("Outside_Air_Temperature_Sensor"); // plant-reference.md §9 (Brick 1.4)
    expect(point.lowLimit).toBeCloseTo((40 - 32) / 1.8, 9);
    expect(point.highLimit).toBeCloseTo((60 - 32) / 1.8, 9);
    expect(auditFor(String(point.id)).map((a) => a.action)).toEqual(["create"]);

    expect((await call("customer", `/api/points/${point.id}`)).status).toBe(200);
    const patched = await call(
      "admin",
      `/api/points/${point.id}`,
      json("PATCH", { highLimit: 20, expectedIntervalS: 60 }),
    );
    expect(patched.status).toBe(200);
    expect(patched.body.point).toMatchObject({ highLimit: 20, expectedIntervalS: 60 });
    expect(patched.body.point.lowLimit).toBeCloseTo((40 - 32) / 1.8, 9);
    const patchBad = await call("admin", `/api/points/${point.id}`, json("PATCH", { lowLimit: 30 }));
    expect(patchBad.status).toBe(400);
    expect(patchBad.body.error.details[0].path).toBe("highLimit");
    expect((await call("technician", `/api/points/${point.id}`, json("PATCH", { highLimit: 25 }))).status).toBe(403);

    const audit = auditFor(String(point.id));
    expect(audit.map((a) => a.action)).toEqual(["create", "update"]);
    expect(JSON.parse(audit[1].before).expectedIntervalS).toBe(30);
    expect(JSON.parse(audit[1].after).expectedIntervalS).toBe(60);
    expect(audit[1].actor_name).toBeTruthy();

    expect((await call("technician", `/api/points/${point.id}`, { method: "DELETE" })).status).toBe(403);
    expect((await call("admin", `/api/points/${point.id}`, { method: "DELETE" })).status).toBe(204);
    expect((await call("admin", `/api/points/${point.id}`)).status).toBe(404);
    expect(auditFor(String(point.id)).map((a) => a.action)).toEqual(["create", "update", "delete"]);
  });

  it("refuses to remove a point a gateway point map feeds", async () => {
    const created = await call("admin", path, json("POST", { quantity: "outdoor_air_humidity" }));
    expect(created.status).toBe(201);
    const gw = await provisionGateway(server, cookies.admin, { siteId: OWN_SITE, name: "Points test" });
    const map = await putPointMap(
      server,
      cookies.admin,
      gw.gateway.id,
      "gateway_point,equipment,quantity,unit\nWS9-RH,WS-9,outdoor_air_humidity,%\n",
    );
    expect(map.status).toBe(200);
    const refused = await call("admin", `/api/points/${created.body.point.id}`, { method: "DELETE" });
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toMatch(/point map/);
    const detail = await call("admin", `/api/points/${created.body.point.id}`);
    expect(detail.body.point.mappedBy).toEqual([{ gatewayId: gw.gateway.id, gatewayPoint: "WS9-RH" }]);
  });
});

describe("site point list", () => {
  const path = `/api/sites/${OWN_SITE}/point-list`;
  const list = [
    HEADER,
    "CH-1,chiller,drive_temp,degF,5,,176", // existing point: a limit is added
    "AHU-2,air_handler,chilled_water_valve_position,%,10,0,100", // existing: interval and limits
    "WS-1,weather_station,outdoor_air_temp,degC,5,,", // existing and the same: unchanged
    "CT-1,cooling_tower,fan_drive_frequency,Hz,5,0,60", // existing: limits
    "AHU-9,air_handler,chilled_water_valve_position,%,60,-5,105", // new point
  ].join("\r\n");
  const countPoints = () => {
    const d = db();
    try {
      return (d.prepare("select count(*) n from points").get() as { n: number }).n;
    } finally {
      d.close();
    }
  };

  it("previews without changing anything", async () => {
    const before = countPoints();
    const res = await call("admin", `${path}?dryRun=1`, csv(list));
    expect(res.status).toBe(200);
    expect(res.body.applied).toBe(false);
    expect(res.body.plan.counts).toEqual({ create: 1, update: 3, unchanged: 1 });
    const drive = res.body.plan.items.find((i: { quantity: string }) => i.quantity === "drive_temp");
    // 176 °F = 80 °C (NIST SP 811 B.8).
    expect(drive.after.highLimit).toBeCloseTo(80, 9);
    expect(countPoints()).toBe(before);
  });

  it("refuses technicians and customers (403), another customer's site (404), non-CSV bodies (415)", async () => {
    expect((await call("technician", `${path}?dryRun=1`, csv(list))).status).toBe(403);
    expect((await call("customer", `${path}?dryRun=1`, csv(list))).status).toBe(403);
    expect((await call("customer", `/api/sites/${OTHER_SITE}/point-list?dryRun=1`, csv(list))).status).toBe(404);
    expect((await call("anonymous", path, csv(list))).status).toBe(401);
    const plain = await call("admin", path, { method: "POST", headers: { "content-type": "text/plain" }, body: list });
    expect(plain.status).toBe(415);
  });

  it("reports bad rows and unknown tags by line and column, and applies nothing", async () => {
    const before = countPoints();
    const bad = [
      HEADER,
      "CH-1,chiller,drive_temp,degF,5,,176", // 2 good
      "CH-77,chiller,drive_temp,degC,5,,", // 3 no such equipment
      "CH-1,chiller,drive_temp,degC,5,,80", // 4 duplicate of line 2
      "CT-1,pump,pump_status,bool,5,,", // 5 CT-1 is a cooling tower
      "AHU-9,air_handler,run_status,bool,sixty,,", // 6 interval
    ].join("\n");
    const res = await call("admin", path, csv(bad));
    expect(res.status).toBe(400);
    expect(res.body.applied).toBe(false);
    expect(res.body.errors.map((e: { line: number; column: string }) => [e.line, e.column])).toEqual([
      [3, "equipment_tag"],
      [4, "quantity"],
      [5, "equipment_kind"],
      [6, "expected_interval_s"],
    ]);
    expect(countPoints()).toBe(before);
    const header = await call("admin", path, csv("tag,kind,quantity\nCH-1,chiller,drive_temp\n"));
    expect(header.status).toBe(400);
    expect(header.body.errors).toEqual([{ line: 1, column: null, message: expect.stringMatching(/header/) }]);
  });

  it("applies a good list in one go, audits each created and changed point, and lists it back", async () => {
    const before = countPoints();
    const res = await call("admin", path, csv(list));
    expect(res.status).toBe(200);
    expect(res.body.applied).toBe(true);
    expect(countPoints()).toBe(before + 1);
    const created = res.body.plan.items.find((i: { action: string }) => i.action === "create");
    const point = await call("admin", `/api/points/${(await findPoint("AHU-9", "chilled_water_valve_position")).id}`);
    expect(point.body.point).toMatchObject({ expectedIntervalS: 60, lowLimit: -5, highLimit: 105 });
    expect(created.equipmentTag).toBe("AHU-9");
    const audit = auditFor(String(point.body.point.id));
    expect(audit.map((a) => a.action)).toEqual(["create"]);
    // Applying the same list again changes nothing.
    const again = await call("admin", `${path}?preview=1`, csv(list));
    expect(again.body.plan.counts).toEqual({ create: 0, update: 0, unchanged: 5 });
    const exported = await call("customer", path);
    expect(exported.status).toBe(200);
    expect(exported.headers.get("content-type")).toMatch(/^text\/csv/);
    expect(exported.body.split("\n")[0]).toBe(HEADER.replace(/, /g, ","));
    expect(exported.body).toContain("AHU-9,air_handler,chilled_water_valve_position,%,60,-5,105");
  });

  it("previews and applies 5,000 rows quickly", async () => {
    // A site with 200 chillers (written straight to the database: equipment records have their
    // own API), 25 points each per lib/quantities.ts pointsByKind.chiller = 5,000 rows.
    const d = new Database(server.databasePath);
    try {
      d.prepare(
        "insert into sites (id, name, organization_id, kind, address, time_zone) values ('bulk-site', 'Bulk', 'org-harborview', 'Test', '1 Test Way', 'America/Chicago')",
      ).run();
      const insert = d.prepare(
        "insert into equipment (id, site_id, tag, name, kind) values (?, 'bulk-site', ?, ?, 'chiller')",
      );
      d.transaction(() => {
        for (let c = 1; c <= 200; c++) insert.run(`bulk-site:CH-${c}`, `CH-${c}`, `Chiller ${c}`);
      })();
    } finally {
      d.close();
    }
    const rows: string[] = [HEADER];
    for (let c = 1; c <= 200; c++)
      for (const q of pointsByKind.chiller.filter((k) => k !== "chiller_stop_reason").slice(0, 25))
        rows.push(`CH-${c},chiller,${q},${unitOf(q)},5,,`);
    expect(rows.length - 1).toBe(5000);
    const body = rows.join("\r\n");
    let t0 = performance.now();
    const preview = await call("admin", "/api/sites/bulk-site/point-list?dryRun=1", csv(body));
    const previewMs = performance.now() - t0;
    expect(preview.status).toBe(200);
    expect(preview.body.plan.counts).toEqual({ create: 5000, update: 0, unchanged: 0 });
    t0 = performance.now();
    const res = await call("admin", "/api/sites/bulk-site/point-list", csv(body));
    const applyMs = performance.now() - t0;
    expect(res.status).toBe(200);
    expect(res.body.applied).toBe(true);
    console.log(`[points] 5,000-row point list: preview ${previewMs.toFixed(0)} ms, apply ${applyMs.toFixed(0)} ms`);
    // Generous on a shared 2-core machine (common practice: a person waiting on an upload notices seconds).
    expect(previewMs).toBeLessThan(5000);
    expect(applyMs).toBeLessThan(10000);
    const d2 = db();
    try {
      const n = d2
        .prepare(
          "select count(*) n from points join equipment on equipment.id = points.equipment_id where site_id = 'bulk-site'",
        )
        .get() as { n: number };
      expect(n.n).toBe(5000);
      const audits = d2.prepare("select count(*) n from audit_log where site_id = 'bulk-site'").get() as { n: number };
      expect(audits.n).toBe(5000);
    } finally {
      d2.close();
    }
  });
});

async function findPoint(tag: string, quantity: string) {
  const res = await call("admin", `/api/equipment/${encodeURIComponent(`${OWN_SITE}:${tag}`)}/points`);
  return res.body.points.find((p: { quantity: string }) => p.quantity === quantity);
}

function unitOf(q: string): string {
  if (q.endsWith("_temp") || q.endsWith("setpoint")) return "degC";
  if (q.endsWith("_dp")) return "kPad";
  if (q.endsWith("pressure")) return "kPa";
  if (q.endsWith("flow")) return "L/s";
  if (q.endsWith("power")) return "kW";
  if (q.endsWith("speed") || q.endsWith("position") || q.endsWith("humidity")) return "%";
  if (q.endsWith("frequency")) return "Hz";
  if (q === "fan_drive_mode") return "state";
  if (q === "fault_text") return "text";
  if (q.endsWith("time_left") || q.endsWith("timer_setting")) return "s";
  return "bool";
}

describe("open formats", () => {
  it("exports Brick Turtle and a Haystack grid to the owning customer, 404 to another", async () => {
    const brick = await call("customer", `/api/sites/${OWN_SITE}/export/brick`);
    expect(brick.status).toBe(200);
    expect(brick.headers.get("content-type")).toMatch(/^text\/turtle/);
    const quads = new Parser().parse(brick.body);
    expect(quads.some((q) => q.object.value === "https://brickschema.org/schema/Brick#Site")).toBe(true);
    const hay = await call("customer", `/api/sites/${OWN_SITE}/export/haystack`);
    expect(hay.status).toBe(200);
    expect(hay.body.meta.ver).toBe("3.0");
    expect((await call("customer", `/api/sites/${OTHER_SITE}/export/brick`)).status).toBe(404);
    expect((await call("customer", `/api/sites/${OTHER_SITE}/export/haystack`)).status).toBe(404);
    expect((await call("anonymous", `/api/sites/${OWN_SITE}/export/brick`)).status).toBe(401);
  });

  it("serves the admin's point-list page with its export links; not to a technician", async () => {
    const page = await call("admin", `/sites/${OWN_SITE}/points/import`);
    expect(page.status).toBe(200);
    expect(page.body).toContain("Point list");
    expect(page.body).toContain(`/api/sites/${OWN_SITE}/export/brick`);
    expect(page.body).toContain(`/api/sites/${OWN_SITE}/export/haystack`);
    expect((await call("technician", `/sites/${OWN_SITE}/points/import`)).status).toBe(404);
  }, 180_000); // a development server compiles the page on its first request
});
