import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { migrateDb, openDb, type Db } from "@/db/client";
import { DEMO_SITES, SERVICE_ORG, seedDemo } from "@/db/seed/demo";
import { alarms, notificationPreferences, sites } from "@/db/schema";
import { insertTrainingSite } from "@/db/queries/drills";
import { systemViewer } from "@/lib/auth/viewer";
import { newAlarm, type TransitionRecord } from "@/lib/alarms";
import { createEscalator } from "@/lib/server/alarms/escalation";
import { customerAlarmMail } from "@/lib/server/notify/customer-mail";
import type { Mailer, MailMessage } from "@/lib/server/mail";
import { eq } from "drizzle-orm";

// A training site is a simulated plant for drills: its alarms must reach no one — no on-call push, text or
// mail, no admin escalation, no customer opt-in mail — while the same alarm on a real site does (the
// control: ISA-18.2 §11 expects an annunciated alarm to reach an operator; training must not page one).

let db: Db;
const admin = systemViewer(SERVICE_ORG.id);
const sent: MailMessage[] = [];
const mailer = {
  send: async (m: MailMessage) => void sent.push(m),
  close: async () => {},
  sinkPort: null,
  held: () => [],
  storeHeld: () => {},
} as unknown as Mailer;

function raise(id: string, siteId: string) {
  const machine = { ...newAlarm({ ruleId: "chiller_trip", equipment: "CH-1", priority: 1 }), state: "unacknowledged" };
  db.insert(alarms)
    .values({
      id,
      siteId,
      key: machine.key,
      ruleId: "chiller_trip",
      equipment: "CH-1",
      priority: 1,
      state: "unacknowledged",
      conditionActive: true,
      machineJson: JSON.stringify(machine),
      detailJson: JSON.stringify({
        technicianMessage: "CH-1 tripped",
        ownerMessage: "A chiller stopped",
        advice: [],
        caution: null,
        numbers: {},
        related: [],
        atMs: Date.now(),
      }),
      activeSinceMs: Date.now(),
      lastTransitionMs: Date.now(),
      activations: 1,
    })
    .run();
}

beforeAll(() => {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "liftline-training-"));
  db = openDb(path.join(dir, "test.db"));
  migrateDb(db);
  seedDemo(db, "training-test-password");
  insertTrainingSite(db, admin, {
    id: "training-1",
    name: "Training plant",
    timeZone: "UTC",
    layout: "medical-office",
  });
  // The customer of a real site opted in to alarm mail, so the control case has someone to reach; the training
  // site is put under the same customer (as a misfiled one would be) so only the training flag can keep it quiet.
  db.insert(notificationPreferences)
    .values({ userId: `user-${DEMO_SITES[0].customer.id}`, alarmStartEndMail: true })
    .run();
  db.update(sites).set({ organizationId: DEMO_SITES[0].customer.id }).where(eq(sites.id, "training-1")).run();
});

describe("training sites never notify anyone", () => {
  it("the escalator skips a training site's alarm and reaches the on-call technician for a real one", async () => {
    const escalator = createEscalator({ db, mailer, clock: Date.now, publicUrl: "http://localhost", log: () => {} });
    raise("alarm-training", "training-1");
    expect(await escalator.run()).toBe(0);
    expect(sent).toHaveLength(0);
    raise("alarm-real", DEMO_SITES[0].id);
    expect(await escalator.run()).toBeGreaterThan(0);
    expect(sent.length).toBeGreaterThan(0);
    expect(sent.every((m) => !m.text.includes("Training plant"))).toBe(true);
  });

  it("customer opt-in mail is not sent for a training site, and is for the real one", () => {
    sent.length = 0;
    const mail = customerAlarmMail({ db, mailer, publicUrl: "http://localhost", log: () => {} });
    const t = {
      alarmKey: "chiller_trip:CH-1",
      priority: 1,
      cause: "condition_active",
      from: "normal",
      to: "unacknowledged",
    } as unknown as TransitionRecord;
    mail("training-1", [t]);
    expect(sent).toHaveLength(0);
    mail(DEMO_SITES[0].id, [t]);
    expect(sent.map((m) => m.to)).toEqual([DEMO_SITES[0].customer.userEmail]);
  });
});
