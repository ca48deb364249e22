import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { api, connectGateway, provisionGateway, putPointMap } from "../helpers/mqtt";
import { signIn, startServer, type TestServer } from "../helpers/server";

// The alarm API against the real server: a controller fault published by a gateway raises an
// alarm through the rules; then who may read and act on it, and the rule-settings API.
let server: TestServer;
const cookies: Record<string, string> = {};
let alarmId: string;

/** Publishes a latched chiller alarm for `tag` through a fresh gateway; returns the raised alarm's id. */
async function raiseChillerTrip(siteId: string, tag: string, fault: string): Promise<string> {
  const gw = await provisionGateway(server, cookies.admin, { siteId });
  const p = tag.replace("-", "");
  const csv = `gateway_point,equipment,quantity,unit\n${p}-ALM,${tag},chiller_alarm,bool\n${p}-FAULT,${tag},fault_text,text\n${p}-RUN,${tag},run_status,bool\n`;
  expect((await putPointMap(server, cookies.admin, gw.gateway.id, csv)).status).toBe(200);
  const client = await connectGateway(server, gw);
  // Two samples 10 s apart: the rules evaluate every 5 s of event time.
  const t0 = Date.now() - 20_000;
  for (const [i, ts] of [t0, t0 + 10_000].entries()) {
    const at = new Date(ts).toISOString();
    const readings = [
      { point: `${p}-ALM`, value: true, ts: at },
      { point: `${p}-FAULT`, value: fault, ts: at },
      { point: `${p}-RUN`, value: false, ts: at },
    ];
    await client.publishAsync(`liftline/${gw.gateway.id}/readings`, JSON.stringify({ seq: i, sentAt: at, readings }), {
      qos: 1,
    });
  }
  await client.endAsync();
  for (let i = 0; i < 50; i++) {
    const { body } = await api(server, cookies.tech, `/api/alarms?site=${siteId}`);
    const found = body.alarms?.find(
      (a: { ruleId: string; equipment: string }) => a.ruleId === "chiller_tripped" && a.equipment === tag,
    );
    if (found) return found.id;
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(`no chiller_tripped alarm for ${siteId} ${tag}`);
}

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
  alarmId = await raiseChillerTrip("harborview-mob", "CH-1", "High condenser pressure");
  expect(alarmId, "the rules raised a chiller-tripped alarm").toBeTruthy();
});
afterAll(() => server?.stop());

const post = (who: string, path: string, body: unknown) =>
  api(server, cookies[who], path, {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify(body),
  });

describe("alarm API", () => {
  it("shows the alarm with the controller's fault text, unacknowledged", async () => {
    const { status, body } = await api(server, cookies.tech, `/api/alarms/${alarmId}`);
    expect(status).toBe(200);
    expect(body.alarm).toMatchObject({
      ruleId: "chiller_tripped",
      equipment: "CH-1",
      state: "unacknowledged",
      conditionActive: true,
    });
    expect(body.alarm.detail.technicianMessage).toContain("High condenser pressure");
    expect(body.alarm.events[0]).toMatchObject({ cause: "condition_active", from: "normal", to: "unacknowledged" });
  });

  it("filters by state and priority, and refuses a bad filter", async () => {
    expect(
      (await api(server, cookies.tech, "/api/alarms?state=unacknowledged&priority=2")).body.alarms.some(
        (a: { id: string }) => a.id === alarmId,
      ),
    ).toBe(true);
    expect(
      (await api(server, cookies.tech, "/api/alarms?state=acknowledged")).body.alarms.some(
        (a: { id: string }) => a.id === alarmId,
      ),
    ).toBe(false);
    expect((await api(server, cookies.tech, "/api/alarms?state=bogus")).status).toBe(400);
    expect((await api(server, cookies.tech, "/api/alarms?priority=9")).status).toBe(400);
  });

  it("lets the owner read it but not act (403); another customer gets 404", async () => {
    expect((await api(server, cookies.owner, `/api/alarms/${alarmId}`)).status).toBe(200);
    expect((await post("owner", `/api/alarms/${alarmId}/ack`, {})).status).toBe(403);
    expect(
      (await post("owner", `/api/alarms/${alarmId}/notes`, { text: "hello", visibility: "customer" })).status,
    ).toBe(403);
    expect((await post("owner", `/api/alarms/${alarmId}/shelve`, { minutes: 10, reason: "test" })).status).toBe(403);
    expect((await post("owner", `/api/alarms/${alarmId}/unshelve`, {})).status).toBe(403);
    expect((await api(server, cookies.otherOwner, `/api/alarms/${alarmId}`)).status).toBe(404);
    expect((await post("otherOwner", `/api/alarms/${alarmId}/ack`, {})).status).toBe(404);
    expect((await api(server, cookies.otherOwner, "/api/alarms")).body.alarms).toEqual([]);
  });

  it("validates bodies: a note needs text and a visibility, shelving needs minutes and a reason", async () => {
    expect((await post("tech", `/api/alarms/${alarmId}/notes`, { text: "", visibility: "internal" })).status).toBe(400);
    expect((await post("tech", `/api/alarms/${alarmId}/notes`, { text: "x", visibility: "everyone" })).status).toBe(
      400,
    );
    expect((await post("tech", `/api/alarms/${alarmId}/shelve`, { minutes: 0, reason: "test run" })).status).toBe(400);
    expect((await post("tech", `/api/alarms/${alarmId}/shelve`, { minutes: 30 })).status).toBe(400);
  });

  it("keeps internal notes from the owner and shows shared ones", async () => {
    expect(
      (
        await post("tech", `/api/alarms/${alarmId}/notes`, {
          text: "Internal: check the drive",
          visibility: "internal",
        })
      ).status,
    ).toBe(201);
    expect(
      (
        await post("tech", `/api/alarms/${alarmId}/notes`, {
          text: "A technician is on the way",
          visibility: "customer",
        })
      ).status,
    ).toBe(201);
    const staff = (await api(server, cookies.tech, `/api/alarms/${alarmId}`)).body.alarm.notes.map(
      (n: { text: string }) => n.text,
    );
    const owner = (await api(server, cookies.owner, `/api/alarms/${alarmId}`)).body.alarm.notes.map(
      (n: { text: string }) => n.text,
    );
    expect(staff).toEqual(["Internal: check the drive", "A technician is on the way"]);
    expect(owner).toEqual(["A technician is on the way"]);
  });

  it("acknowledges once, records who and the note, and refuses a second acknowledgement", async () => {
    const ack = await post("tech", `/api/alarms/${alarmId}/ack`, { note: "Seen, heading there" });
    expect(ack.status).toBe(200);
    expect(ack.body.state).toBe("acknowledged");
    expect((await post("tech", `/api/alarms/${alarmId}/ack`, {})).status).toBe(409);
    const { events } = (await api(server, cookies.tech, `/api/alarms/${alarmId}`)).body.alarm;
    expect(events.at(-1)).toMatchObject({
      cause: "acknowledged",
      to: "acknowledged",
      actor: "Luis Ferreira",
      note: "Seen, heading there",
    });
    const ownerEvents = (await api(server, cookies.owner, `/api/alarms/${alarmId}`)).body.alarm.events;
    expect(ownerEvents.at(-1).note).toBeNull();
  });

  it("shelves with an expiry and a reason, then unshelves", async () => {
    const shelved = await post("tech", `/api/alarms/${alarmId}/shelve`, {
      minutes: 30,
      reason: "Known fault, repair booked",
    });
    expect(shelved.body.state).toBe("shelved");
    const { alarm } = (await api(server, cookies.tech, `/api/alarms/${alarmId}`)).body;
    expect(alarm.shelveReason).toBe("Known fault, repair booked");
    expect(alarm.shelvedUntilMs - alarm.lastTransitionMs).toBe(30 * 60_000);
    expect((await post("tech", `/api/alarms/${alarmId}/unshelve`, {})).body.state).not.toBe("shelved");
  });
});

describe("e-mailed acknowledge link", () => {
  it("reaches the technician on call, acknowledges from a phone without signing in, and works only once", async () => {
    const id = await raiseChillerTrip("millbrook-high", "CH-2", "Drive over-temperature");
    // The demo rota puts Luis on call; the local SMTP sink keeps the message for the outbox.
    let mail: { to: string; text: string } | undefined;
    for (let i = 0; i < 50 && !mail; i++) {
      const { body } = await api(server, cookies.admin, "/api/outbox");
      mail = body.messages.find((m: { text: string }) => m.text.includes(`/alarms/${id}`));
      if (!mail) await new Promise((r) => setTimeout(r, 200));
    }
    expect(mail?.to).toBe("luis@tallgrass.example");
    const token = /\/ack\/([A-Za-z0-9_-]+)/.exec(mail!.text)![1];

    const page = await fetch(`${server.url}/ack/${token}`);
    expect(page.status).toBe(200);
    expect(await page.text()).toContain("Acknowledge this alarm");

    const first = await fetch(`${server.url}/api/ack-links/${token}`, { method: "POST" });
    expect(first.status).toBe(200);
    expect((await first.json()).state).toBe("acknowledged");
    const { alarm } = (await api(server, cookies.tech, `/api/alarms/${id}`)).body;
    expect(alarm.events.at(-1)).toMatchObject({ cause: "acknowledged", actor: "Luis Ferreira" });

    const second = await fetch(`${server.url}/api/ack-links/${token}`, { method: "POST" });
    expect(second.status).toBe(409);
    expect((await second.json()).error.message).toMatch(/already used/);
    expect(
      (await fetch(`${server.url}/api/ack-links/not-a-real-token-not-a-real-token`, { method: "POST" })).status,
    ).toBe(404);
    // The outbox is the admin's: others are refused.
    expect((await api(server, cookies.tech, "/api/outbox")).status).toBe(403);
  });
});

describe("rule settings API", () => {
  const url = "/api/sites/harborview-mob/rule-settings";
  const put = (who: string, body: unknown) =>
    api(server, cookies[who], url, {
      method: "PUT",
      headers: { "content-type": "application/json" },
      body: JSON.stringify(body),
    });

  it("lets an admin override a setting, validated, with defaults filling the rest", async () => {
    const res = await put("admin", { crossoverRisk: { warnTimeToCrossoverS: 2400 } });
    expect(res.status).toBe(200);
    expect(res.body.effective.crossoverRisk.warnTimeToCrossoverS).toBe(2400);
    expect(res.body.effective.crossoverRisk.fitWindowS).toBe(600);
    const get = await api(server, cookies.tech, url);
    expect(get.body.overrides).toEqual({ crossoverRisk: { warnTimeToCrossoverS: 2400 } });
  });

  it("refuses unknown keys and bad values with the path at fault, and keeps the old settings", async () => {
    const typo = await put("admin", { crossoverRisk: { warnTimeToCrossoverMin: 40 } });
    expect(typo.status).toBe(400);
    expect(typo.body.error.details[0].path).toBe("crossoverRisk");
    const negative = await put("admin", { crossoverRisk: { warnTimeToCrossoverS: -5 } });
    expect(negative.status).toBe(400);
    expect(negative.body.error.details[0].path).toBe("crossoverRisk.warnTimeToCrossoverS");
    expect((await api(server, cookies.tech, url)).body.overrides).toEqual({
      crossoverRisk: { warnTimeToCrossoverS: 2400 },
    });
  });

  it("is staff-only: technicians read, only admins write, owners get 403, other customers 404", async () => {
    expect((await put("tech", {})).status).toBe(403);
    expect((await api(server, cookies.owner, url)).status).toBe(403);
    expect((await api(server, cookies.otherOwner, url)).status).toBe(404);
  });
});
