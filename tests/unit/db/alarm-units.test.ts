import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { migrateDb, openDb, type Db } from "@/db/client";
import { getAlarm, listAlarms } from "@/db/queries/alarms";
import { getViewerById } from "@/db/queries/users";
import { seedDemo } from "@/db/seed/demo";
import type { Viewer } from "@/lib/auth/viewer";
import { pushPayload, smsText } from "@/lib/notify/messages";
import type { Reading } from "@/lib/plant/site";
import { fmtPressure, fmtTemp } from "@/lib/rules/format";
import { createAlarmService } from "@/lib/server/alarms/service";
import { createStorageHealth } from "@/lib/server/storage-health";

// The same stored alarm read by an IP viewer and an SI viewer: °F and psig for one, °C and kPa abs
// for the other (NIST SP 811, 2008, App. B.8/B.9: °F = 1.8·°C + 32; 1 psi = 6.894757 kPa; standard
// atmosphere 101.325 kPa). E-mail, push and SMS are built from the recipient's own read of the alarm
// (lib/server/alarms/escalation.ts reads it with the recipient as viewer), so they follow too.

const SITE = "harborview-mob";
const now = Date.UTC(2026, 5, 1, 12, 0, 0);
let db: Db;
let alarmId: string;
let ipViewer: Viewer;
let siViewer: Viewer;

beforeAll(() => {
  db = openDb(":memory:");
  migrateDb(db);
  seedDemo(db, "unit-test-password");
  const service = createAlarmService({
    db,
    clock: () => now,
    storage: createStorageHealth({ clock: () => now, recoveryMs: 0, log: () => {} }),
    log: () => {},
  });
  // A latched trip makes a real alarm row; its words are then replaced by a message as the rules write it.
  const trip = (atMs: number): Reading[] => [
    { tsMs: atMs, equipment: "CH-1", quantity: "chiller_alarm", value: true },
    { tsMs: atMs, equipment: "CH-1", quantity: "fault_text", value: "High condenser pressure" },
    { tsMs: atMs, equipment: "CH-1", quantity: "run_status", value: false },
  ];
  for (const t of [now, now + 10_000]) if (service.record(SITE, trip(t))) service.evaluateDue(SITE);
  alarmId = (db.$client.prepare("select id from alarms where rule_id = 'chiller_tripped'").get() as { id: string }).id;
  const detail = {
    technicianMessage: `CH-1: condenser pressure ${fmtPressure(1000)}, chilled water leaving ${fmtTemp(6.7)}.`,
    ownerMessage: "The chiller stopped itself on high pressure.",
    advice: [`Restart only once the condenser water is below ${fmtTemp(29.4)}.`],
    caution: null,
    numbers: {},
    related: [],
    atMs: now,
  };
  db.$client.prepare("update alarms set detail_json = ? where id = ?").run(JSON.stringify(detail), alarmId);
  const tech = getViewerById(db, "user-tech-1")!;
  ipViewer = { ...tech, unitSystem: "ip" };
  siViewer = { ...tech, unitSystem: "si" };
});
afterAll(() => db.$client.close());

describe("one alarm, two unit systems", () => {
  it("an IP viewer reads °F and psig", () => {
    const a = getAlarm(db, ipViewer, alarmId)!;
    // (1000 − 101.325) / 6.894757 = 130.34 psig; 6.7 °C × 1.8 + 32 = 44.06 °F; 29.4 °C = 84.92 °F.
    expect(a.detail.technicianMessage).toBe("CH-1: condenser pressure 130.3 psig, chilled water leaving 44.1 °F.");
    expect(a.detail.advice).toEqual(["Restart only once the condenser water is below 84.9 °F."]);
  });

  it("an SI viewer reads °C and kPa abs", () => {
    const a = getAlarm(db, siViewer, alarmId)!;
    expect(a.detail.technicianMessage).toBe("CH-1: condenser pressure 1000 kPa abs, chilled water leaving 6.7 °C.");
    expect(listAlarms(db, siViewer).find((x) => x.id === alarmId)!.detail.advice).toEqual([
      "Restart only once the condenser water is below 29.4 °C.",
    ]);
  });

  it("push and SMS built from each recipient's read carry that recipient's units", () => {
    const noticeFor = (v: Viewer) => {
      const a = getAlarm(db, v, alarmId)!;
      return {
        alarmId,
        siteName: a.siteName,
        equipment: a.equipment,
        priority: a.priority,
        line: a.detail.technicianMessage,
      };
    };
    expect(smsText(noticeFor(siViewer), "A1")).toMatch(/1000 kPa abs/);
    expect(smsText(noticeFor(ipViewer), "A1")).toMatch(/130\.3 psig/);
    expect(pushPayload(noticeFor(siViewer), { open: "/a", ack: "/b" }).body).toMatch(/6\.7 °C/);
  });

  it("a row stored before quantities keeps its words", () => {
    const old = "CH-1: condenser pressure 1000 kPa (130 psig).";
    db.$client
      .prepare("update alarms set detail_json = json_set(detail_json, '$.technicianMessage', ?) where id = ?")
      .run(old, alarmId);
    expect(getAlarm(db, siViewer, alarmId)!.detail.technicianMessage).toBe(old);
    expect(getAlarm(db, ipViewer, alarmId)!.detail.technicianMessage).toBe(old);
  });
});
