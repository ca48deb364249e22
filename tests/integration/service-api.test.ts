import type { MqttClient } from "mqtt";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { api, connectGateway, provisionGateway, putPointMap, raiseChillerTrip, waitFor } from "../helpers/mqtt";
import { signIn, startServer, type TestServer } from "../helpers/server";

// The service call's API against the real server: a customer's request reaches the on-call
// technician by e-mail (the local SMTP sink) and becomes a visit; visits, their log, linked alarms,
// temporary changes and closing; who may see and do what; and the put-back check against a
// controller's timer setting published by a gateway over MQTT.
let server: TestServer;
const cookies: Record<string, string> = {};
let gateway: MqttClient;
let gatewayId: string;
let seq = 0;

beforeAll(async () => {
  server = await startServer();
  for (const [who, email] of Object.entries({
    admin: "admin@tallgrass.example",
    tech: "luis@tallgrass.example",
    owner: "facilities@harborview.example",
    otherOwner: "ops@quarryridge.example",
  })) {
    cookies[who] = (await signIn(server.url, email)).cookie!;
  }
  const gw = await provisionGateway(server, cookies.admin, { siteId: "harborview-mob" });
  gatewayId = gw.gateway.id;
  const map = await putPointMap(
    server,
    cookies.admin,
    gatewayId,
    "gateway_point,equipment,quantity,unit\nCH1-SS,CH-1,start_to_start_timer_setting,s\n",
  );
  expect(map.status).toBe(200);
  gateway = await connectGateway(server, gw);
}, 180_000);
afterAll(async () => {
  await gateway?.endAsync();
  await server?.stop();
});

const send = (who: string | null, method: string, path: string, body: unknown) =>
  api(server, who ? cookies[who] : "", path, {
    method,
    headers: { "content-type": "application/json" },
    body: JSON.stringify(body),
  });
const post = (who: string | null, path: string, body: unknown) => send(who, "POST", path, body);
const fieldsOf = (body: { error?: { details?: Array<{ path: string }> } }) =>
  (body.error?.details ?? []).map((d) => d.path);

/** The controller's start-to-start timer setting, in seconds, as the gateway reports it. */
async function publishTimer(seconds: number) {
  const ts = new Date().toISOString();
  await gateway.publishAsync(
    `liftline/${gatewayId}/readings`,
    JSON.stringify({ seq: ++seq, sentAt: ts, readings: [{ point: "CH1-SS", value: seconds, ts }] }),
    { qos: 1 },
  );
}

describe("service requests", { timeout: 120_000 }, () => {
  let requestId: string;

  it("refuses without sign-in, validates field by field, and 404s another organization's site", async () => {
    expect((await post(null, "/api/service-requests", {})).status).toBe(401);
    expect((await api(server, "", "/api/service-requests")).status).toBe(401);
    const bad = await post("owner", "/api/service-requests", {
      siteId: "harborview-mob",
      description: "",
      urgency: "yesterday",
      callbackPhone: "call me",
    });
    expect(bad.status).toBe(400);
    expect(fieldsOf(bad.body).sort()).toEqual(["callbackPhone", "description", "urgency"]);
    const other = await post("owner", "/api/service-requests", {
      siteId: "quarry-ridge-dh2",
      description: "Too warm on level 3",
      urgency: "today",
      callbackPhone: "+1 555 0100",
    });
    expect(other.status).toBe(404);
  });

  it("a customer's request reaches the on-call technician by e-mail and shows its state in plain words", async () => {
    const created = await post("owner", "/api/service-requests", {
      siteId: "harborview-mob",
      description: "Clinic rooms too warm since 7 am",
      urgency: "now",
      callbackPhone: "+1 555 0100",
    });
    expect(created.status).toBe(201);
    requestId = created.body.request.id;
    expect(created.body.request).toMatchObject({ state: "received", urgency: "now", siteId: "harborview-mob" });
    expect(created.body.request.stateText).toMatch(/received your request/);
    // The demo rota puts Luis on call first (db/seed/demo.ts).
    const mail = await waitFor(async () => {
      const { body } = await api(server, cookies.admin, "/api/outbox");
      return (body.messages as Array<{ to: string; subject: string; text: string }>).find((m) =>
        m.text.includes("Clinic rooms too warm"),
      );
    });
    expect(mail.to).toBe("luis@tallgrass.example");
    expect(mail.subject).toContain("service request");
    expect(mail.text).toContain("+1 555 0100");

    expect((await api(server, cookies.otherOwner, `/api/service-requests/${requestId}`)).status).toBe(404);
    expect((await api(server, cookies.otherOwner, "/api/service-requests")).body.requests).toEqual([]);
    const board = await api(server, cookies.tech, "/api/service-requests?open=1");
    expect(board.body.requests.map((r: { id: string }) => r.id)).toContain(requestId);
  });

  it("becomes a visit when a technician takes it; the customer sees who and when they are on the way", async () => {
    expect((await send("owner", "PATCH", `/api/service-requests/${requestId}`, { assignTo: "me" })).status).toBe(403);
    expect((await send("tech", "PATCH", `/api/service-requests/${requestId}`, { state: "soon" })).status).toBe(400);
    expect((await send("tech", "PATCH", `/api/service-requests/${requestId}`, {})).status).toBe(400);
    const taken = await post("tech", "/api/visits", { serviceRequestId: requestId, mode: "on_site" });
    expect(taken.status).toBe(201);
    expect(taken.body.visit).toMatchObject({ origin: "service_request", siteId: "harborview-mob", closedAt: null });
    expect(taken.body.visit.openSnapshot.points).toBeInstanceOf(Array);
    expect((await post("tech", "/api/visits", { serviceRequestId: requestId, mode: "on_site" })).status).toBe(409);
    let seen = await api(server, cookies.owner, `/api/service-requests/${requestId}`);
    expect(seen.body.request).toMatchObject({ state: "assigned", visitId: taken.body.visit.id });
    expect(seen.body.request.stateText).toBe("Luis Ferreira is looking after your request.");
    expect((await send("tech", "PATCH", `/api/visits/${taken.body.visit.id}`, { arrive: true })).status).toBe(200);
    seen = await api(server, cookies.owner, `/api/service-requests/${requestId}`);
    expect(seen.body.request.stateText).toBe("Luis Ferreira is on the way.");
    const closed = await post("tech", `/api/visits/${taken.body.visit.id}/close`, { summary: "Reset the AHU-2 valve" });
    expect(closed.status).toBe(200);
    seen = await api(server, cookies.owner, `/api/service-requests/${requestId}`);
    expect(seen.body.request.state).toBe("done");
  });
});

describe("visits", { timeout: 120_000 }, () => {
  let visitId: string;
  let alarmId: string;

  it("opens from an alarm, linking it; customers may not open one (403 own site, 404 another's)", async () => {
    alarmId = await raiseChillerTrip(server, cookies.admin, "harborview-mob", "CH-1", "Low oil pressure");
    expect((await post(null, "/api/visits", { alarmId, mode: "remote" })).status).toBe(401);
    expect((await post("owner", "/api/visits", { alarmId, mode: "remote" })).status).toBe(403);
    expect((await post("otherOwner", "/api/visits", { alarmId, mode: "remote" })).status).toBe(404);
    expect((await post("otherOwner", "/api/visits", { siteId: "harborview-mob", mode: "remote" })).status).toBe(404);
    const bad = await post("tech", "/api/visits", { mode: "by_phone" });
    expect(bad.status).toBe(400);
    expect(fieldsOf(bad.body)).toContain("mode");
    const opened = await post("tech", "/api/visits", { alarmId, mode: "remote" });
    expect(opened.status).toBe(201);
    visitId = opened.body.visit.id;
    expect(opened.body.visit.origin).toBe("alarm");
    expect(opened.body.visit.alarms.map((a: { id: string }) => a.id)).toEqual([alarmId]);
    // Acknowledged from the visit page through the alarm API, as anywhere else.
    expect((await post("tech", `/api/alarms/${alarmId}/ack`, { note: "on it" })).status).toBe(200);
    const visit = await api(server, cookies.tech, `/api/visits/${visitId}`);
    expect(visit.body.visit.alarms[0].state).toBe("acknowledged");
  });

  it("keeps the running log for staff only", async () => {
    expect((await post("tech", `/api/visits/${visitId}/entries`, { text: "" })).status).toBe(400);
    expect((await post("owner", `/api/visits/${visitId}/entries`, { text: "hello" })).status).toBe(403);
    expect((await post("otherOwner", `/api/visits/${visitId}/entries`, { text: "hello" })).status).toBe(404);
    const added = await post("tech", `/api/visits/${visitId}/entries`, { text: "Oil pressure switch reads low" });
    expect(added.status).toBe(201);
    expect(added.body.visit.entries.at(-1)).toMatchObject({
      text: "Oil pressure switch reads low",
      author: "Luis Ferreira",
    });
    const asOwner = await api(server, cookies.owner, `/api/visits/${visitId}`);
    expect(asOwner.status).toBe(200);
    expect(asOwner.body.visit.entries).toBeNull();
    expect(asOwner.body.visit.openSnapshot).toBeNull();
    expect((await api(server, cookies.otherOwner, `/api/visits/${visitId}`)).status).toBe(404);
    expect((await api(server, cookies.otherOwner, "/api/visits?site=harborview-mob")).body.visits).toEqual([]);
    expect((await api(server, cookies.owner, "/api/visits?site=harborview-mob")).body.visits.length).toBeGreaterThan(0);
    expect((await api(server, cookies.tech, "/api/visits?open=2")).status).toBe(400);
  });

  it("records arrival once, and links alarms of the same site only", async () => {
    expect((await send("tech", "PATCH", `/api/visits/${visitId}`, { depart: true })).status).toBe(409);
    expect((await send("tech", "PATCH", `/api/visits/${visitId}`, { arrive: true })).status).toBe(200);
    expect((await send("tech", "PATCH", `/api/visits/${visitId}`, { arrive: true })).status).toBe(409);
    const parts = await send("tech", "PATCH", `/api/visits/${visitId}`, {
      partsUsed: [{ part: "Oil filter", quantity: 1 }],
    });
    expect(parts.body.visit.partsUsed).toEqual([{ part: "Oil filter", quantity: 1 }]);
    expect(
      (await send("tech", "PATCH", `/api/visits/${visitId}`, { partsUsed: [{ part: "", quantity: 0 }] })).status,
    ).toBe(400);
    expect((await send("owner", "PATCH", `/api/visits/${visitId}`, { summary: "x" })).status).toBe(403);
    expect((await post("tech", `/api/visits/${visitId}/alarms`, { alarmId })).status).toBe(200);
    expect((await post("tech", `/api/visits/${visitId}/alarms`, { alarmId: "no-such-alarm" })).status).toBe(404);
    expect((await post("tech", `/api/visits/${visitId}/alarms`, {})).status).toBe(400);
  });

  it("records a temporary change, shows it in plain words, refuses to close without why and who, and checks the put-back against the live timer", async () => {
    await publishTimer(300); // the shortened start-to-start timer, 5 min
    const change = {
      equipmentId: "harborview-mob:CH-1",
      kind: "controller_setting",
      what: "Start-to-start timer",
      pointQuantity: "start_to_start_timer_setting",
      fromValue: "20 min",
      toValue: "5 min",
      reason: "to recover from this morning's trip",
      putBackDueAt: new Date(Date.now() + 2 * 3600_000).toISOString(),
    };
    const past = await post("tech", `/api/visits/${visitId}/changes`, {
      ...change,
      putBackDueAt: new Date(Date.now() - 60_000).toISOString(),
    });
    expect(past.status).toBe(400);
    expect(fieldsOf(past.body)).toEqual(["putBackDueAt"]);
    const badKind = await post("tech", `/api/visits/${visitId}/changes`, { ...change, kind: "magic", fromValue: "" });
    expect(fieldsOf(badKind.body).sort()).toEqual(["fromValue", "kind"]);
    const otherSite = await post("tech", `/api/visits/${visitId}/changes`, {
      ...change,
      equipmentId: "quarry-ridge-dh2:CH-1",
    });
    expect(fieldsOf(otherSite.body)).toEqual(["equipmentId"]);
    expect((await post("owner", `/api/visits/${visitId}/changes`, change)).status).toBe(403);
    const made = await post("tech", `/api/visits/${visitId}/changes`, change);
    expect(made.status).toBe(201);
    const changeId = made.body.change.id;

    const asOwner = await api(server, cookies.owner, "/api/sites/harborview-mob/temporary-changes");
    expect(asOwner.status).toBe(200);
    const shown = asOwner.body.changes.find((c: { id: string }) => c.id === changeId);
    expect(shown.plainText).toMatch(
      /^A technician has set .+'s restart timer shorter to recover from this morning's trip; it will be set back by /,
    );
    expect((await api(server, cookies.otherOwner, "/api/sites/harborview-mob/temporary-changes")).status).toBe(404);

    const refused = await post("tech", `/api/visits/${visitId}/close`, { summary: "Restarted CH-1" });
    expect(refused.status).toBe(409);
    expect(fieldsOf(refused.body).sort()).toEqual(["openChangesNote", "openChangesOwnerId"]);
    const closed = await post("tech", `/api/visits/${visitId}/close`, {
      summary: "Restarted CH-1",
      openChangesNote: "Plant must run through the afternoon",
      openChangesOwnerId: "user-tech-2",
    });
    expect(closed.status).toBe(200);
    expect(closed.body.visit.closeSnapshot.atMs).toBeGreaterThan(closed.body.visit.openSnapshot.atMs);
    expect(closed.body.visit.openChangesOwner.name).toBe("Priya Raman");
    expect((await post("tech", `/api/visits/${visitId}/entries`, { text: "late" })).status).toBe(409);

    // Marked put back while the controller still reads 300 s: Liftline says they disagree.
    expect((await post("owner", `/api/temporary-changes/${changeId}/put-back`, { valueNow: "20 min" })).status).toBe(
      403,
    );
    expect(
      (await post("otherOwner", `/api/temporary-changes/${changeId}/put-back`, { valueNow: "20 min" })).status,
    ).toBe(404);
    expect((await post("tech", `/api/temporary-changes/${changeId}/put-back`, { valueNow: "" })).status).toBe(400);
    const putBack = await post("tech", `/api/temporary-changes/${changeId}/put-back`, { valueNow: "20 min" });
    expect(putBack.status).toBe(200);
    expect(putBack.body.change.liveCheck).toMatchObject({ matchesPutBack: false, readingValue: 300 });
    expect(putBack.body.change.liveCheck.message).toContain("still the temporary value");
    expect((await post("tech", `/api/temporary-changes/${changeId}/put-back`, { valueNow: "20 min" })).status).toBe(
      409,
    );
    expect((await api(server, cookies.owner, "/api/sites/harborview-mob/temporary-changes")).body.changes).toEqual([]);

    // The controller now reports 20 min = 1200 s: they agree.
    await publishTimer(1200);
    const agreed = await waitFor(async () => {
      const { body } = await api(server, cookies.tech, `/api/visits/${visitId}`);
      const c = body.visit.changes.find((x: { id: string }) => x.id === changeId);
      return c?.liveCheck?.matchesPutBack === true ? c : null;
    });
    expect(agreed.liveCheck.readingValue).toBe(1200);
  });
});
