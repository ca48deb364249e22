import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterEach, beforeEach, describe, expect, it } from "vitest";
import { migrateDb, openDb, type Db } from "@/db/client";
import { saveAlarmChanges } from "@/db/queries/alarms";
import { consumeAckLink, createShift, listMail } from "@/db/queries/oncall";
import { getViewerById } from "@/db/queries/users";
import { seedDemo } from "@/db/seed/demo";
import { newAlarm, stepAlarm } from "@/lib/alarms";
import { createEscalator } from "@/lib/server/alarms/escalation";
import { createAlarmService } from "@/lib/server/alarms/service";
import { createMailer, type Mailer } from "@/lib/server/mail";

// Escalation by e-mail through the real SMTP path (nodemailer → the local smtp-server sink),
// with a fake clock so ten minutes pass in no time.
let db: Db;
let mailer: Mailer;
let now: number;
const clock = () => now;
const DELAY_MS = 10 * 60_000;
const START = Date.UTC(2026, 11, 1, 3, 0, 0); // 03:00 UTC, someone is on call
/** E-mail only, backup after the delay and admins after twice it: the mail path on its own. */
const emailOnly = (priority: number) => ({
  priority,
  paths: ["email" as const],
  backupAfterS: DELAY_MS / 1000,
  adminsAfterS: (2 * DELAY_MS) / 1000,
});

beforeEach(async () => {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "liftline-esc-"));
  db = openDb(path.join(dir, "test.db"));
  migrateDb(db);
  seedDemo(db, "demo-password-1");
  mailer = await createMailer({ db, sinkPort: 0, from: "Liftline <alerts@liftline.invalid>", log: () => {} });
  now = START;
  createShift(db, {
    startsAt: START - 3600_000,
    endsAt: START + 7 * 24 * 3600_000,
    primaryUserId: "user-tech-1",
    backupUserId: "user-tech-2",
  });
});
afterEach(async () => {
  await mailer.close();
  db.$client.close();
});

/** Raises a priority-1 crossover alarm on the school's CH-1, as the rule engine would. */
function raiseAlarm(): string {
  const fresh = newAlarm({ ruleId: "crossover_risk", equipment: "CH-1", priority: 1 });
  const { alarm, transitions } = stepAlarm(fresh, { type: "condition", atMs: now, active: true });
  const detail = {
    technicianMessage: "Loops cross in about 12 min",
    ownerMessage: "Cooling at risk",
    advice: ["Restore heat rejection"],
    caution: "Qualified technicians only.",
    numbers: {},
    related: [],
    atMs: now,
  };
  const stored = saveAlarmChanges(db, "millbrook-high", [alarm], transitions, new Map([[alarm.key, detail]]));
  return stored[0].alarmId;
}

const waitForMail = async (n: number) => {
  for (let i = 0; i < 50 && listMail(db).length < n; i++) await new Promise((r) => setTimeout(r, 20));
  return listMail(db);
};

describe("on-call escalation", () => {
  it("e-mails the primary at once, the backup after the delay, then the admins, while nobody acknowledges", async () => {
    const escalator = createEscalator({
      db,
      mailer,
      clock,
      publicUrl: "http://liftline.test",
      policy: emailOnly,
      log: () => {},
    });
    raiseAlarm();
    expect(await escalator.run()).toBe(1);
    let mail = await waitForMail(1);
    expect(mail[0].to).toBe("luis@tallgrass.example");
    expect(mail[0].subject).toContain("Millbrook High School");
    expect(mail[0].text).toMatch(/http:\/\/liftline\.test\/ack\/[A-Za-z0-9_-]+/);

    now += DELAY_MS - 1000;
    expect(await escalator.run()).toBe(0); // not yet
    now += 1000;
    expect(await escalator.run()).toBe(1);
    mail = await waitForMail(2);
    expect(mail[0].to).toBe("priya@tallgrass.example");

    now += DELAY_MS;
    expect(await escalator.run()).toBe(1);
    mail = await waitForMail(3);
    expect(mail[0].to).toBe("admin@tallgrass.example");
    expect(await escalator.run()).toBe(0); // nothing sent twice
  });

  it("stops escalating once someone acknowledges, and the e-mailed link works once", async () => {
    const escalator = createEscalator({
      db,
      mailer,
      clock,
      publicUrl: "http://liftline.test",
      policy: emailOnly,
      log: () => {},
    });
    const service = createAlarmService({ db, clock });
    const alarmId = raiseAlarm();
    await escalator.run();
    const [mail] = await waitForMail(1);
    const token = /\/ack\/([A-Za-z0-9_-]+)/.exec(mail.text)![1];

    const link = consumeAckLink(db, token, now);
    expect(link).toEqual({ ok: true, alarmId, userId: "user-tech-1" });
    const viewer = getViewerById(db, "user-tech-1")!;
    expect(service.command(viewer, alarmId, { type: "acknowledge", note: "on my way" }).state).toBe("acknowledged");
    expect(consumeAckLink(db, token, now)).toEqual({ ok: false, reason: "used" });

    now += 3 * DELAY_MS;
    expect(await escalator.run()).toBe(0);
    expect((await waitForMail(1)).length).toBe(1);
  });

  it("refuses an expired link", async () => {
    const escalator = createEscalator({
      db,
      mailer,
      clock,
      publicUrl: "http://liftline.test",
      policy: emailOnly,
      log: () => {},
    });
    raiseAlarm();
    await escalator.run();
    const [mail] = await waitForMail(1);
    const token = /\/ack\/([A-Za-z0-9_-]+)/.exec(mail.text)![1];
    expect(consumeAckLink(db, token, now + 5 * 3600_000)).toEqual({ ok: false, reason: "expired" });
    expect(consumeAckLink(db, "made-up-token-made-up-token", now)).toEqual({ ok: false, reason: "unknown" });
  });

  it("e-mails a low-priority alarm to the primary once and never escalates it (the default policy)", async () => {
    const escalator = createEscalator({ db, mailer, clock, publicUrl: "http://liftline.test", log: () => {} });
    const fresh = newAlarm({ ruleId: "efficiency_drift", equipment: "CH-1", priority: 4 });
    const { alarm, transitions } = stepAlarm(fresh, { type: "condition", atMs: now, active: true });
    saveAlarmChanges(db, "millbrook-high", [alarm], transitions, new Map());
    expect(await escalator.run()).toBe(1);
    expect((await waitForMail(1))[0].to).toBe("luis@tallgrass.example");
    now += 24 * 3600_000;
    expect(await escalator.run()).toBe(0);
  });
});

describe("passes that overlap", () => {
  it("sends a critical alarm at once while another pass still waits on a slow mail server, and never twice", async () => {
    let releaseMail: () => void = () => {};
    const mailHeld = new Promise<void>((r) => (releaseMail = r));
    const sentTo: string[] = [];
    // A mail server that answers only when released: the first pass stays in flight.
    const slowMailer = {
      ...mailer,
      send: async (m: { to: string }) => {
        sentTo.push(m.to);
        await mailHeld;
      },
    } as unknown as Mailer;
    const escalator = createEscalator({
      db,
      mailer: slowMailer,
      clock,
      publicUrl: "http://liftline.test",
      log: () => {},
      policy: (priority) =>
        priority === 1
          ? { priority, paths: ["email"], backupAfterS: 180, adminsAfterS: 360 }
          : { priority, paths: ["email"], backupAfterS: null, adminsAfterS: null },
    });
    const low = newAlarm({ ruleId: "efficiency_drift", equipment: "CH-1", priority: 4 });
    const lowStep = stepAlarm(low, { type: "condition", atMs: now, active: true });
    saveAlarmChanges(db, "millbrook-high", [lowStep.alarm], lowStep.transitions, new Map());
    const firstPass = escalator.run();
    await new Promise((r) => setTimeout(r, 20));
    expect(sentTo).toHaveLength(1);
    raiseAlarm();
    // The second pass must reach the critical alarm's recipient while the first is still held.
    const secondPass = escalator.run();
    await new Promise((r) => setTimeout(r, 20));
    expect(sentTo).toHaveLength(2);
    releaseMail();
    await Promise.all([firstPass, secondPass]);
    // A third pass finds both recorded and sends nothing again.
    expect(await escalator.run()).toBe(0);
    expect(sentTo).toHaveLength(2);
  });
});

describe("alarm audit trail", () => {
  it("cannot be edited or deleted", () => {
    raiseAlarm();
    expect(() => db.$client.prepare("update alarm_events set note = 'changed'").run()).toThrow(/append-only/);
    expect(() => db.$client.prepare("delete from alarm_events").run()).toThrow(/append-only/);
  });
});
