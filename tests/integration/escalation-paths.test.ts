import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import webpush from "web-push";
import { afterEach, beforeEach, describe, expect, it } from "vitest";
import { migrateDb, openDb, type Db } from "@/db/client";
import { saveAlarmChanges } from "@/db/queries/alarms";
import {
  listDeliveries,
  savePreferences,
  savePushSubscription,
  startSmsVerification,
  verifySmsCode,
} from "@/db/queries/notify";
import { createShift, listMail } from "@/db/queries/oncall";
import { getViewerById } from "@/db/queries/users";
import { seedDemo } from "@/db/seed/demo";
import { newAlarm, stepAlarm, type Priority } from "@/lib/alarms";
import { systemViewer } from "@/lib/auth/viewer";
import { defaultPolicies } from "@/lib/notify/policy";
import { createEscalator, type Escalator } from "@/lib/server/alarms/escalation";
import { createAlarmService } from "@/lib/server/alarms/service";
import { createMailer, type Mailer } from "@/lib/server/mail";
import { startFakePushService, type FakePushService } from "@/lib/server/notify/fake-push";
import { startFakeSmsApi, type FakeSmsApi } from "@/lib/server/notify/fake-sms";
import { createPushSender } from "@/lib/server/notify/push";
import { createSmsSender } from "@/lib/server/notify/sms";
import { customerAlarmMail } from "@/lib/server/notify/customer-mail";
import { createServiceRequest } from "@/db/queries/service-requests";
import { moveServiceRequest } from "@/lib/server/service-requests";
import { decryptPush, newSubscriber } from "../helpers/notify";

// Escalation by priority on every path, with a fake clock: the real push sender (web-push) to the
// local fake push service, the real SMS SDK to the local fake SMS API, e-mail to the SMTP sink.
// The defaults under test are the issue's: critical push + SMS at once, backup after 3 min, admins
// after 6; high push, backup after 10, no admins; medium and low e-mail only, never escalated.

let db: Db;
let mailer: Mailer;
let pushSink: FakePushService;
let smsSink: FakeSmsApi;
let escalator: Escalator;
let now: number;
const START = Date.UTC(2026, 11, 1, 3, 0, 0);
const SERVICE_ORG = "org-tallgrass";
const phones = { "user-tech-1": "+15555550101", "user-tech-2": "+15555550102" } as const;
const subscribers = { "user-tech-1": newSubscriber(), "user-tech-2": newSubscriber() };
const endpoints: Record<string, string> = {};

beforeEach(async () => {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "liftline-esc-paths-"));
  db = openDb(path.join(dir, "test.db"));
  migrateDb(db);
  seedDemo(db, "demo-password-1");
  now = START;
  createShift(db, {
    startsAt: START - 3600_000,
    endsAt: START + 7 * 24 * 3600_000,
    primaryUserId: "user-tech-1",
    backupUserId: "user-tech-2",
  });
  mailer = await createMailer({ db, sinkPort: 0, from: "Liftline <alerts@liftline.invalid>", log: () => {} });
  pushSink = await startFakePushService({ port: 0 });
  smsSink = await startFakeSmsApi({ db, port: 0, webhookUrl: "http://127.0.0.1:9/unused" });
  for (const userId of ["user-tech-1", "user-tech-2"] as const) {
    const viewer = getViewerById(db, userId)!;
    endpoints[userId] = pushSink.newEndpoint();
    savePushSubscription(db, viewer, { endpoint: endpoints[userId], ...subscribers[userId].keys, label: "phone" });
    const code = startSmsVerification(db, viewer, phones[userId], Date.now());
    verifySmsCode(db, viewer, code, Date.now());
  }
  escalator = createEscalator({
    db,
    mailer,
    clock: () => now,
    publicUrl: "http://liftline.test",
    push: createPushSender({ vapid: webpush.generateVAPIDKeys(), subject: "mailto:alerts@liftline.invalid" }),
    sms: createSmsSender({ apiKey: smsSink.apiKey, baseUrl: smsSink.baseUrl, from: "+15555550100" }),
    log: () => {},
  });
});

afterEach(async () => {
  await pushSink.close();
  await smsSink.close();
  await mailer.close();
  db.$client.close();
});

function raise(priority: Priority, equipment = "CH-1"): string {
  const fresh = newAlarm({ ruleId: "chiller_tripped", equipment, priority });
  const { alarm, transitions } = stepAlarm(fresh, { type: "condition", atMs: now, active: true });
  const detail = {
    technicianMessage: "Chiller tripped: high condenser pressure",
    ownerMessage: "A chiller stopped",
    advice: [],
    caution: "",
    numbers: {},
    related: [],
    atMs: now,
  };
  return saveAlarmChanges(db, "millbrook-high", [alarm], transitions, new Map([[alarm.key, detail]]))[0].alarmId;
}

/** "step:person:path" for each notification of the alarm, oldest first. */
function deliveries(alarmId: string): string[] {
  const names: Record<string, string> = { "Luis Ferreira": "primary" };
  return listDeliveries(db, systemViewer(SERVICE_ORG), alarmId)
    .reverse()
    .map((d) => `${d.step}:${names[d.person] ?? d.person}:${d.path}`);
}

const steps = (alarmId: string) => listDeliveries(db, systemViewer(SERVICE_ORG), alarmId).map((d) => d.step);

describe("escalation by priority (fake clock)", () => {
  it("critical: push and text to the primary at once, the backup after 3 min, the admins after 6", async () => {
    const id = raise(1);
    await escalator.run();
    expect(
      deliveries(id)
        .filter((d) => d.startsWith("0:"))
        .sort(),
    ).toEqual(["0:primary:push", "0:primary:sms"]);
    const [push] = pushSink.received(endpoints["user-tech-1"].split("/").pop());
    expect(decryptPush(subscribers["user-tech-1"], push.body)).toMatchObject({ priority: 1, equipment: "CH-1" });

    now += 3 * 60_000 - 1000;
    await escalator.run();
    expect(steps(id)).not.toContain(1);
    // The next step's time is known, so the 1 s timer wakes for it (lib/server/alarms/start.ts).
    expect(escalator.nextDueAtMs()).toBe(START + 3 * 60_000);
    now += 1000;
    await escalator.run();
    expect(steps(id).filter((s) => s === 1)).toHaveLength(2); // the backup's push and text

    now += 3 * 60_000;
    await escalator.run();
    // The admin has no device or number: e-mailed instead, and it says so.
    const admin = listDeliveries(db, systemViewer(SERVICE_ORG), id).filter((d) => d.step === 2);
    expect(admin.map((d) => d.path)).toEqual(["email"]);
    expect(admin[0].detail).toMatch(/e-mailed instead/);
    expect(await escalator.run()).toBe(0);
  });

  it("high: push only to the primary, the backup after 10 min, never the admins", async () => {
    const id = raise(2);
    await escalator.run();
    expect(deliveries(id)).toEqual(["0:primary:push"]);
    now += 10 * 60_000 - 1000;
    await escalator.run();
    expect(steps(id)).toEqual([0]);
    now += 1000;
    await escalator.run();
    expect(steps(id).sort()).toEqual([0, 1]);
    now += 24 * 3600_000;
    await escalator.run();
    expect(steps(id).sort()).toEqual([0, 1]);
  });

  it("medium and low: e-mail to the primary, never escalated", async () => {
    for (const p of [3, 4] as const) {
      const id = raise(p, p === 3 ? "CH-1" : "CT-1");
      await escalator.run();
      expect(deliveries(id)).toEqual(["0:primary:email"]);
      now += 24 * 3600_000;
      await escalator.run();
      expect(deliveries(id)).toEqual(["0:primary:email"]);
    }
    expect(defaultPolicies.map((p) => [p.priority, p.backupAfterS, p.adminsAfterS])).toEqual([
      [1, 180, 360],
      [2, 600, null],
      [3, null, null],
      [4, null, null],
    ]);
  });

  it("an acknowledgement stops every path for everyone", async () => {
    const service = createAlarmService({ db, clock: () => now });
    const id = raise(1);
    await escalator.run();
    const before = deliveries(id).length;
    service.command(getViewerById(db, "user-tech-2")!, id, { type: "acknowledge", note: "on it" });
    now += 60 * 60_000;
    expect(await escalator.run()).toBe(0);
    expect(deliveries(id).length).toBe(before);
  });

  it("a dead subscription (410) is removed and recorded as failed", async () => {
    await fetch(`${pushSink.origin}/_control/gone/${endpoints["user-tech-1"].split("/").pop()}`, { method: "POST" });
    const id = raise(2);
    await escalator.run();
    const [d] = listDeliveries(db, systemViewer(SERVICE_ORG), id);
    expect(d).toMatchObject({ path: "push", status: "failed" });
    expect(d.detail).toMatch(/410.*removed/);
    const left = db.$client
      .prepare("select count(*) as n from push_subscriptions where user_id = ?")
      .get("user-tech-1") as {
      n: number;
    };
    expect(left.n).toBe(0);
  });
});

describe("customers' opt-in e-mail", () => {
  it("tells a customer who chose it when a high alarm starts and ends at their own site, and nobody else", async () => {
    const customer = getViewerById(db, "user-org-millbrook")!;
    const other = getViewerById(db, "user-org-harborview")!;
    savePreferences(db, customer, { alarmStartEndMail: true, serviceRequestMail: false });
    savePreferences(db, other, { alarmStartEndMail: true, serviceRequestMail: false });
    const tell = customerAlarmMail({ db, mailer, publicUrl: "http://liftline.test", log: () => {} });
    const fresh = newAlarm({ ruleId: "chiller_tripped", equipment: "CH-1", priority: 2 });
    const started = stepAlarm(fresh, { type: "condition", atMs: now, active: true });
    saveAlarmChanges(db, "millbrook-high", [started.alarm], started.transitions, new Map());
    tell("millbrook-high", started.transitions);
    const cleared = stepAlarm(started.alarm, { type: "condition", atMs: now + 60_000, active: false });
    saveAlarmChanges(db, "millbrook-high", [cleared.alarm], cleared.transitions, new Map());
    tell("millbrook-high", cleared.transitions);
    const mail = async () => listMail(db).filter((m) => m.to.includes("example"));
    await expect.poll(async () => (await mail()).length, { timeout: 5000 }).toBe(2);
    const sent = await mail();
    expect(sent.every((m) => m.to === customer.email)).toBe(true);
    expect(sent.map((m) => m.subject).sort()).toEqual([
      "Millbrook High School: a high-priority alarm started",
      "Millbrook High School: an alarm has cleared",
    ]);
  });

  it("tells a customer who chose it when their service request moves on, in the site page's words, and nobody else", async () => {
    const customer = getViewerById(db, "user-org-millbrook")!;
    const quiet = getViewerById(db, "user-org-harborview")!;
    savePreferences(db, customer, { alarmStartEndMail: false, serviceRequestMail: true });
    savePreferences(db, quiet, { alarmStartEndMail: false, serviceRequestMail: true });
    const request = createServiceRequest(
      db,
      customer,
      {
        siteId: "millbrook-high",
        description: "Classrooms warm since noon",
        urgency: "today",
        callbackPhone: "555 0100",
      },
      now,
    );
    const tech = getViewerById(db, "user-tech-1")!;
    const ctx = { db, nowMs: now, sendMail: (m: { to: string; subject: string; text: string }) => mailer.send(m) };
    moveServiceRequest(ctx, tech, request.id, { assignTo: "me" });
    // No change of state, no mail: an assignment to the same person again says nothing new.
    moveServiceRequest(ctx, tech, request.id, { assignTo: "me" });
    moveServiceRequest(ctx, tech, request.id, { state: "on_the_way" });
    const mail = async () => listMail(db).filter((m) => m.subject.includes("your service request"));
    await expect.poll(async () => (await mail()).length, { timeout: 5000 }).toBe(2);
    const sent = await mail();
    expect(sent.every((m) => m.to === customer.email)).toBe(true);
    const bodies = sent.map((m) => m.text).join("\n");
    expect(bodies).toContain(`${tech.name} is looking after your request.`);
    expect(bodies).toContain(`${tech.name} is on the way.`);
  });
});
