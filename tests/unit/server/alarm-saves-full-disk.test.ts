import { afterEach, beforeEach, describe, expect, it } from "vitest";
import { migrateDb, openDb, type Db } from "@/db/client";
import { getViewerById } from "@/db/queries/users";
import { seedDemo } from "@/db/seed/demo";
import type { Reading } from "@/lib/plant/site";
import { createAlarmService, type AlarmService } from "@/lib/server/alarms/service";
import { createStorageHealth, type StorageHealth } from "@/lib/server/storage-health";

// The alarm service when its saves fail with SQLITE_FULL ("database or disk is full",
// https://www.sqlite.org/rescode.html#full): a person's command is refused and undone, so memory
// and rows agree; what the rule checks changed is kept and saved once space returns.

const SITE = "harborview-mob";
let db: Db;
let health: StorageHealth;
let service: AlarmService;
const now = Date.UTC(2026, 5, 1, 12, 0, 0);

/** From now on every alarm write needs a page SQLite may not add, as on a full disk. */
function fillDisk() {
  db.$client.exec(`create table if not exists filler (b blob);
    create trigger alarms_need_space before insert on alarm_events
    begin insert into filler values (randomblob(100000)); end;`);
  db.$client.pragma("max_page_count = 1");
}
function freeDisk() {
  db.$client.pragma("max_page_count = 1073741823");
  db.$client.exec("drop trigger alarms_need_space; delete from filler;");
}

/** A latched chiller fault on CH-1, two samples 10 s apart (the rules evaluate every 5 s). */
function trip(atMs: number): Reading[] {
  return [
    { tsMs: atMs, equipment: "CH-1", quantity: "chiller_alarm", value: true },
    { tsMs: atMs, equipment: "CH-1", quantity: "fault_text", value: "High condenser pressure" },
    { tsMs: atMs, equipment: "CH-1", quantity: "run_status", value: false },
  ];
}
function feed(atMs: number) {
  if (service.record(SITE, trip(atMs))) service.evaluateDue(SITE);
}
const storedAlarm = () =>
  db.$client.prepare("select id, state from alarms where site_id = ? and rule_id = 'chiller_tripped'").get(SITE) as
    { id: string; state: string } | undefined;

beforeEach(() => {
  db = openDb(":memory:");
  migrateDb(db);
  seedDemo(db, "unit-test-password");
  health = createStorageHealth({ clock: () => now, recoveryMs: 0, log: () => {} });
  service = createAlarmService({ db, clock: () => now, storage: health, log: () => {} });
});
afterEach(() => db.$client.close());

describe("alarm saves on a full disk", () => {
  it("keeps what the rules changed in memory and saves it with the next evaluation after space returns", () => {
    fillDisk();
    feed(now);
    feed(now + 10_000);
    expect(storedAlarm()).toBeUndefined();
    expect(health.problem()?.kind).toBe("full");

    freeDisk();
    feed(now + 20_000);
    expect(storedAlarm()?.state).toBe("unacknowledged");
    const events = db.$client.prepare("select to_state from alarm_events where alarm_id = ?").pluck();
    expect(events.all(storedAlarm()!.id)).toContain("unacknowledged");
    expect(health.problem()).toBeNull();
  });

  it("refuses a person's acknowledgement it cannot save, and leaves the alarm as it was", () => {
    feed(now);
    feed(now + 10_000);
    const alarm = storedAlarm()!;
    expect(alarm.state).toBe("unacknowledged");
    const tech = getViewerById(db, "user-tech-1")!;

    fillDisk();
    expect(() => service.command(tech, alarm.id, { type: "acknowledge", note: "on my way" })).toThrow(
      /database or disk is full/,
    );
    expect(storedAlarm()?.state).toBe("unacknowledged");

    // Had memory kept the acknowledgement, this one would be refused as already done.
    freeDisk();
    expect(service.command(tech, alarm.id, { type: "acknowledge", note: "on my way" }).state).toBe("acknowledged");
    expect(storedAlarm()?.state).toBe("acknowledged");
  });
});
