import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { and, eq } from "drizzle-orm";
import { afterEach, beforeEach, describe, expect, it } from "vitest";
import { migrateDb, openDb, type Db } from "@/db/client";
import { saveAlarmChanges } from "@/db/queries/alarms";
import { getEquipmentHistory } from "@/db/queries/equipment-history";
import { getViewerById } from "@/db/queries/users";
import { equipment, points, readings } from "@/db/schema";
import { seedDemo } from "@/db/seed/demo";
import { newAlarm, stepAlarm } from "@/lib/alarms";

// One chiller's history read back from the database: alarms on its tag, each change of its fault
// text, starts and stops with run hours (hours-meter arithmetic, common practice), staff only.
let db: Db;
const H = 3_600_000;
const T0 = Date.UTC(2026, 5, 1, 8);

beforeEach(() => {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "liftline-eqh-"));
  db = openDb(path.join(dir, "test.db"));
  migrateDb(db);
  seedDemo(db, "demo-password-1");
});
afterEach(() => db.$client.close());

function pointOf(equipmentId: string, quantity: string): number {
  return db
    .select({ id: points.id })
    .from(points)
    .where(and(eq(points.equipmentId, equipmentId), eq(points.quantity, quantity)))
    .get()!.id;
}

describe("equipment history", () => {
  it("puts alarms, fault changes and starts on one timeline, with run hours, for staff only", () => {
    const ch1 = db
      .select({ id: equipment.id })
      .from(equipment)
      .where(and(eq(equipment.siteId, "millbrook-high"), eq(equipment.tag, "CH-1")))
      .get()!;
    const run = pointOf(ch1.id, "run_status");
    const fault = pointOf(ch1.id, "fault_text");
    // Runs 08:00–10:00, trips (fault text), restarts 10:30, runs to 11:00.
    const runRows = [
      [0, 1],
      [1, 1],
      [2, 0],
      [2.5, 1],
    ].map(([h, v]) => ({ pointId: run, ts: T0 + h * H, value: v }));
    const faultRows = [
      [0, ""],
      [1, ""],
      [2, "High condenser pressure"],
      [2.2, "High condenser pressure"],
      [2.5, ""],
    ].map(([h, t]) => ({ pointId: fault, ts: T0 + (h as number) * H, text: t as string }));
    db.insert(readings)
      .values([...runRows, ...faultRows])
      .run();
    const fresh = newAlarm({ ruleId: "chiller_tripped", equipment: "CH-1", priority: 2 });
    const tripped = stepAlarm(fresh, { type: "condition", atMs: T0 + 2 * H, active: true });
    saveAlarmChanges(db, "millbrook-high", [tripped.alarm], tripped.transitions, new Map());

    const tech = getViewerById(db, "user-tech-1")!;
    const window = { fromMs: T0, toMs: T0 + 3 * H, nowMs: T0 + 3 * H };
    const h = getEquipmentHistory(db, tech, ch1.id, window)!;
    // 08:00–10:00 and 10:30–11:00: 2.5 h; one start seen (10:30), the 08:00 sample opens the record.
    expect(h.run!.runHours).toBeCloseTo(2.5, 9);
    expect(h.run!.starts).toBe(1);
    const byKind = (k: string) => h.events.filter((e) => e.kind === k).map((e) => [e.atMs - T0, e.title]);
    expect(byKind("run")).toEqual([
      [2 * H, "Stopped"],
      [2.5 * H, "Started"],
    ]);
    expect(byKind("fault")).toEqual([
      [0, "Last fault: clear"],
      [2 * H, "Last fault: High condenser pressure"],
      [2.5 * H, "Last fault: clear"],
    ]);
    expect(byKind("alarm")).toHaveLength(1);
    expect(byKind("alarm")[0][0]).toBe(2 * H);

    // A customer, even of this very site, does not get the service company's working record.
    const customer = getViewerById(db, "user-org-millbrook")!;
    expect(getEquipmentHistory(db, customer, ch1.id, window)).toBeNull();
  });
});
