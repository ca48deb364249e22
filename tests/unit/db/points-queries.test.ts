import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { migrateDb, openDb, type Db } from "@/db/client";
import { importPointList } from "@/db/queries/points";
import { DEMO_SITES, SERVICE_ORG, seedDemo } from "@/db/seed/demo";
import { equipment, sites } from "@/db/schema";
import { systemViewer } from "@/lib/auth/viewer";
import { parsePointListCsv, POINT_LIST_COLUMNS } from "@/lib/point-list-csv";
import { pointsByKind } from "@/lib/quantities";

let db: Db;
const admin = systemViewer(SERVICE_ORG.id);

beforeAll(() => {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "liftline-points-"));
  db = openDb(path.join(dir, "test.db"));
  migrateDb(db);
  seedDemo(db, "points-test-password");
  db.insert(sites)
    .values({
      id: "bulk",
      name: "Bulk",
      organizationId: DEMO_SITES[0].customer.id,
      kind: "Test",
      address: "-",
      timeZone: "UTC",
    })
    .run();
  db.insert(equipment)
    .values(
      Array.from({ length: 200 }, (_, i) => ({
        id: `bulk:CH-${i + 1}`,
        siteId: "bulk",
        tag: `CH-${i + 1}`,
        name: `Chiller ${i + 1}`,
        kind: "chiller" as const,
      })),
    )
    .run();
});
afterAll(() => db.$client.close());

describe("importPointList", () => {
  it("applies 5,000 rows in one transaction quickly", () => {
    const lines = [POINT_LIST_COLUMNS.join(",")];
    for (let c = 1; c <= 200; c++)
      for (const q of pointsByKind.chiller.filter((k) => k !== "chiller_stop_reason").slice(0, 25))
        lines.push(`CH-${c},chiller,${q},${q === "fault_text" ? "text" : unit(q)},5,,`);
    const { rows, errors } = parsePointListCsv(lines.join("\n"));
    expect(errors).toEqual([]);
    const t0 = performance.now();
    const result = importPointList(db, admin, "bulk", rows, { apply: true });
    const ms = performance.now() - t0;
    console.log(`[points] importPointList 5,000 rows: ${ms.toFixed(0)} ms`);
    expect(result.applied).toBe(true);
    expect(result.plan.counts.create).toBe(5000);
    const audits = db.$client.prepare("select count(*) n from audit_log where site_id = 'bulk'").get() as { n: number };
    expect(audits.n).toBe(5000);
    // Generous on a shared 2-core machine (common practice: a person waiting on an upload notices seconds).
    expect(ms).toBeLessThan(3000);

    // The same list with one interval changed: one update, audited before → after.
    const changed = parsePointListCsv(
      lines.join("\n").replace("CH-7,chiller,drive_temp,degC,5", "CH-7,chiller,drive_temp,degC,9"),
    );
    const again = importPointList(db, admin, "bulk", changed.rows, { apply: true });
    expect(again.plan.counts).toEqual({ create: 0, update: 1, unchanged: 4999 });
    const last = db.$client
      .prepare("select action, before, after from audit_log where site_id = 'bulk' order by id desc limit 1")
      .get() as { action: string; before: string; after: string };
    expect(last.action).toBe("update");
    expect(JSON.parse(last.before).expectedIntervalS).toBe(5);
    expect(JSON.parse(last.after)).toMatchObject({
      equipmentTag: "CH-7",
      quantity: "drive_temp",
      expectedIntervalS: 9,
    });
  });

  it("lets only administrators plan or apply, and hides another customer's site", () => {
    const { rows } = parsePointListCsv(`${POINT_LIST_COLUMNS.join(",")}\nCH-1,chiller,drive_temp,degC,5,,`);
    const tech = { ...admin, userId: "u-t", role: "technician" as const };
    expect(() => importPointList(db, tech, "bulk", rows, { apply: false })).toThrow(/administrator/);
    const other = { ...admin, userId: "u-c", role: "customer" as const, organizationId: DEMO_SITES[1].customer.id };
    expect(() => importPointList(db, other, "bulk", rows, { apply: false })).toThrow(/No such site/);
    const own = { ...other, organizationId: DEMO_SITES[0].customer.id };
    expect(() => importPointList(db, own, "bulk", rows, { apply: false })).toThrow(/administrator/);
  });
});

function unit(q: string) {
  if (q.endsWith("_temp") || q.endsWith("setpoint")) return "degC";
  if (q.endsWith("_dp")) return "kPad";
  if (q.endsWith("pressure")) return "kPa";
  if (q.endsWith("flow")) return "L/s";
  if (q.endsWith("power")) return "kW";
  if (q.endsWith("speed") || q.endsWith("position")) return "%";
  if (q.endsWith("time_left") || q.endsWith("timer_setting")) return "s";
  return "bool";
}
