import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { api, raiseChillerTrip } from "../helpers/mqtt";
import { signIn, startServer, type TestServer } from "../helpers/server";

// The alarm API against the real server: a controller fault published by a gateway raises an
// alarm through the rules; then who may read and act on it, and the rule-settings API.
let server: TestServer;
const cookies: Record<string, string> = {};
let alarmId: string;

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
  alarmId = await raiseChillerTrip(server, cookies.admin, "harborview-mob", "CH-1", "High condenser pressure");
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

  // The alarm page compiles on first request in development mode.
  it(
    "keeps the technician's shelving reason from the owner, in the alarm and in the list",
    { timeout: 120_000 },
    async () => {
      // Like internal notes and event notes: the reason is the service company's words.
      await post("tech", `/api/alarms/${alarmId}/shelve`, { minutes: 30, reason: "Waiting on the contractor's quote" });
      try {
        const staff = (await api(server, cookies.tech, `/api/alarms/${alarmId}`)).body.alarm;
        expect(staff.shelveReason).toBe("Waiting on the contractor's quote");
        const owner = await api(server, cookies.owner, `/api/alarms/${alarmId}`);
        expect(owner.status).toBe(200);
        expect(owner.body.alarm.state).toBe("shelved");
        expect(owner.body.alarm.shelveReason).toBeNull();
        expect(owner.body.alarm.events.every((e: { note: string | null }) => e.note === null)).toBe(true);
        const list = await api(server, cookies.owner, "/api/alarms?site=harborview-mob&state=shelved");
        expect(list.body.alarms.find((a: { id: string }) => a.id === alarmId).shelveReason).toBeNull();
        expect(JSON.stringify(owner.body) + JSON.stringify(list.body)).not.toContain("contractor's quote");
        // The alarm page's data, which the browser receives in full, holds no reason either.
        const page = await fetch(`${server.url}/alarms/${alarmId}`, { headers: { cookie: cookies.owner } });
        expect(page.status).toBe(200);
        expect(await page.text()).not.toContain("contractor");
      } finally {
        await post("tech", `/api/alarms/${alarmId}/unshelve`, {});
      }
    },
  );

  it("answers a malformed body or wrong types with 400 on every action, never 500", async () => {
    const raw = (path: string, body: string) =>
      api(server, cookies.tech, `/api/alarms/${alarmId}/${path}`, {
        method: "POST",
        headers: { "content-type": "application/json" },
        body,
      });
    for (const action of ["ack", "notes", "shelve", "unshelve"]) {
      for (const body of ["{not json", '{"note":', "[1,2", "null", '"text"', "[]"]) {
        const res = await raw(action, body);
        expect(res.status, `${action} with ${body}`).toBe(400);
        expect(res.body.error.code).toBe("bad_request");
      }
    }
    expect((await post("tech", `/api/alarms/${alarmId}/ack`, { note: 42 })).status).toBe(400);
    expect((await post("tech", `/api/alarms/${alarmId}/notes`, { text: ["x"], visibility: "internal" })).status).toBe(
      400,
    );
    expect((await post("tech", `/api/alarms/${alarmId}/shelve`, { minutes: "30", reason: "test run" })).status).toBe(
      400,
    );
    expect((await post("tech", `/api/alarms/${alarmId}/shelve`, { minutes: 30, reason: 7 })).status).toBe(400);
    expect((await post("tech", `/api/alarms/${alarmId}/unshelve`, { note: false })).status).toBe(400);
    // An empty body is still a plain unshelve (409 here: the alarm is not shelved).
    expect((await raw("unshelve", "")).status).toBe(409);
  });

  it("refuses direction-changing characters and lone surrogates in notes and reasons", async () => {
    // Unicode TR #36 §2.1 (bidirectional overrides), RFC 8259 §8.2 (unpaired surrogates).
    const raw = (path: string, body: string) =>
      api(server, cookies.tech, `/api/alarms/${alarmId}/${path}`, {
        method: "POST",
        headers: { "content-type": "application/json" },
        body,
      });
    const bidi = "Checked \u202eevird eht\u202c ok";
    const res = await post("tech", `/api/alarms/${alarmId}/notes`, { text: bidi, visibility: "internal" });
    expect(res.status).toBe(400);
    expect(res.body.error.details[0].path).toBe("text");
    expect(
      (await post("tech", `/api/alarms/${alarmId}/notes`, { text: "a\u2066b", visibility: "customer" })).status,
    ).toBe(400);
    // Sent as JSON escapes: a lone surrogate in a string body would become U+FFFD on the way.
    expect((await raw("shelve", '{"minutes":10,"reason":"broken \\ud800 text"}')).status).toBe(400);
    expect((await raw("ack", '{"note":"x\\udc00"}')).status).toBe(400);
    expect((await raw("unshelve", '{"note":"\\u202d"}')).status).toBe(400);
    // Ordinary text, accents and emoji (a surrogate pair) included, is fine.
    expect(
      (await post("tech", `/api/alarms/${alarmId}/notes`, { text: "Réglé 👍", visibility: "internal" })).status,
    ).toBe(201);
  });
});

describe("e-mailed acknowledge link", () => {
  it("reaches the technician on call, acknowledges from a phone without signing in, and works only once", async () => {
    const id = await raiseChillerTrip(server, cookies.admin, "millbrook-high", "CH-2", "Drive over-temperature");
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
