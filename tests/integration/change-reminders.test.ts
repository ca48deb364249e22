import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterEach, beforeEach, describe, expect, it } from "vitest";
import { migrateDb, openDb, type Db } from "@/db/client";
import { createShift, listMail } from "@/db/queries/oncall";
import { temporaryChangeRow } from "@/db/queries/temporary-changes";
import { getViewerById } from "@/db/queries/users";
import { seedDemo } from "@/db/seed/demo";
import { createChangeReminders } from "@/lib/server/change-reminders";
import { createMailer, type Mailer } from "@/lib/server/mail";
import { closeVisit, openVisit, putBackTemporaryChange, recordTemporaryChange } from "@/lib/server/visits";

// Reminders to put a temporary change back, through the real SMTP path (nodemailer → the local
// smtp-server sink) on a fake clock, so hours pass in no time. The escalation order (primary, then
// backup, then admins) is the one the alarm escalation uses for an unacknowledged alarm.
let db: Db;
let mailer: Mailer;
let now: number;
const START = Date.UTC(2026, 11, 1, 3, 0, 0);
const EVERY_MS = 30 * 60_000;
const TWO_H = 2 * 3600_000;

beforeEach(async () => {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "liftline-remind-"));
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

const waitForMail = async (n: number) => {
  for (let i = 0; i < 100 && listMail(db).length < n; i++) await new Promise((r) => setTimeout(r, 20));
  return listMail(db);
};

/** A visit on the school with the anti-recycle timer shortened, put back by in two hours. */
function shortenTimer() {
  const tech = getViewerById(db, "user-tech-1")!;
  const ctx = () => ({ db, nowMs: now });
  const visit = openVisit(ctx(), tech, { siteId: "millbrook-high", mode: "remote" });
  const change = recordTemporaryChange(ctx(), tech, visit.id, {
    equipmentId: "millbrook-high:CH-1",
    kind: "controller_setting",
    what: "Start-to-start timer",
    pointQuantity: "start_to_start_timer_setting",
    fromValue: "20 min",
    toValue: "5 min",
    reason: "to recover from this morning's trip",
    putBackDueAt: new Date(now + TWO_H).toISOString(),
  });
  return { tech, visit, change, ctx };
}

describe("temporary-change reminders", () => {
  it("reminds the on-call primary when put-back-by passes, again on schedule, then escalates to backup and admins", async () => {
    const reminders = createChangeReminders({
      db,
      mailer,
      clock: () => now,
      publicUrl: "http://liftline.test",
      policy: { everyMs: EVERY_MS, escalateAfter: 2 },
      log: () => {},
    });
    const { change, visit } = shortenTimer();

    now += TWO_H - 1000;
    expect(await reminders.run()).toBe(0); // not due yet
    now += 1000;
    expect(await reminders.run()).toBe(1);
    let mail = await waitForMail(1);
    expect(mail[0].to).toBe("luis@tallgrass.example");
    expect(mail[0].subject).toContain("Millbrook High School");
    expect(mail[0].text).toContain("Start-to-start timer: 20 min → 5 min");
    expect(mail[0].text).toContain(`http://liftline.test/visits/${visit.id}`);
    expect(mail[0].text).toMatch(/manufacturer's procedures/);

    now += EVERY_MS - 1000;
    expect(await reminders.run()).toBe(0); // not again before the interval
    now += 1000;
    expect(await reminders.run()).toBe(1); // reminder 2, still the primary alone
    expect(temporaryChangeRow(db, change.id)!.escalatedAt).toBeNull();

    now += EVERY_MS;
    expect(await reminders.run()).toBe(2); // reminder 3: primary and backup
    mail = await waitForMail(4);
    expect(
      mail
        .slice(0, 2)
        .map((m) => m.to)
        .sort(),
    ).toEqual(["luis@tallgrass.example", "priya@tallgrass.example"]);
    expect(temporaryChangeRow(db, change.id)!.escalatedAt?.getTime()).toBe(now);
    expect(temporaryChangeRow(db, change.id)!.reminders).toBe(3);

    now += EVERY_MS;
    expect(await reminders.run()).toBe(3); // reminder 4: the admins too
    mail = await waitForMail(7);
    expect(mail.slice(0, 3).map((m) => m.to)).toContain("admin@tallgrass.example");
    expect(await reminders.run()).toBe(0); // nothing twice in one interval
  });

  it("stops reminding once the change is marked put back, even on a visit closed with it in place", async () => {
    const reminders = createChangeReminders({
      db,
      mailer,
      clock: () => now,
      publicUrl: "http://liftline.test",
      policy: { everyMs: EVERY_MS, escalateAfter: 2 },
      log: () => {},
    });
    const { tech, visit, change, ctx } = shortenTimer();
    closeVisit(ctx(), tech, visit.id, {
      summary: "Restarted CH-1 after the trip",
      openChangesNote: "Plant must run through the afternoon",
      openChangesOwnerId: "user-tech-2",
    });
    now += TWO_H;
    expect(await reminders.run()).toBe(1);
    putBackTemporaryChange(ctx(), tech, change.id, { valueNow: "20 min" });
    now += 5 * EVERY_MS;
    expect(await reminders.run()).toBe(0);
    expect((await waitForMail(1)).length).toBe(1);
  });
});
