import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { migrateDb, openDb, type Db } from "@/db/client";
import { saveAlarmChanges } from "@/db/queries/alarms";
import { createServiceRequest } from "@/db/queries/service-requests";
import { getViewerById } from "@/db/queries/users";
import { seedDemo } from "@/db/seed/demo";
import { applyConditions, emptyAlarmBook, type Priority } from "@/lib/alarms";
import { POINT_LIST_COLUMNS } from "@/lib/point-list-csv";
import { canonicalUnitOf, type QuantityKey } from "@/lib/quantities";
import { createCustomer, createEquipment, createSite } from "@/lib/server/plant-records";
import { uploadPointList } from "@/lib/server/points";
import { openVisit, recordTemporaryChange } from "@/lib/server/visits";
import { DEMO_PASSWORD } from "./server";

// A portfolio of many plants written straight into a fresh database through the same use cases
// and queries the routes use (records with their audit entries, visits, temporary changes,
// service requests, stored alarm machines), so a server started on it reads them as its own.

export interface SeededBoard {
  dataDir: string;
  siteIds: string[];
  /** Sites given an active alarm, with its priority. */
  alarms: Map<string, Priority>;
  changes: Set<string>;
  requests: Set<string>;
  customerIds: string[];
}

export function seedBoard(opts: { sites: number; customers: number; nowMs?: number }): SeededBoard {
  const nowMs = opts.nowMs ?? Date.now();
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "liftline-board-"));
  const db: Db = openDb(path.join(dataDir, "liftline.db"));
  try {
    migrateDb(db);
    seedDemo(db, DEMO_PASSWORD);
    const admin = getViewerById(db, "user-admin")!;
    const tech = getViewerById(db, "user-tech-1")!;
    const customerIds = Array.from(
      { length: opts.customers },
      (_, i) => createCustomer(db, admin, { name: `Portfolio Owner ${String(i + 1).padStart(3, "0")}` }).id,
    );
    const out: SeededBoard = {
      dataDir,
      siteIds: [],
      alarms: new Map(),
      changes: new Set(),
      requests: new Set(),
      customerIds,
    };
    for (let i = 0; i < opts.sites; i++) {
      const site = createSite(db, admin, {
        name: `Plant ${String(i + 1).padStart(3, "0")} ${["North", "East", "South", "West"][i % 4]} Campus`,
        kind: "Office",
        address: `${100 + i} Portfolio Way`,
        timeZone: "America/Chicago",
        contacts: [],
        accessNotes: "",
        customerId: customerIds[i % customerIds.length],
      });
      out.siteIds.push(site.id);
      const chiller = createEquipment(db, admin, site.id, {
        kind: "chiller",
        tag: "CH-1",
        name: "Chiller 1",
        capacityTons: 400,
        refrigerant: "R-134a",
        compressorType: "centrifugal_vsd_oil_free",
      });
      createEquipment(db, admin, site.id, {
        kind: "cooling_tower",
        tag: "CT-1",
        name: "Cooling tower 1",
        capacityTons: 500,
        fanDrive: "variable_speed",
        condenserWaterSetpointC: 29.4,
        fanMinSpeedPct: 20,
      });
      createEquipment(db, admin, site.id, {
        kind: "pump",
        tag: "CHWP-1",
        name: "Chilled-water pump 1",
        designFlowLps: 60,
        designHeadKPa: 150,
        loop: "chilled_water",
      });
      // The points a gateway maps: the chiller's status and the loops' temperatures.
      const pointRows = (
        [
          ["CH-1", "chiller", "chiller_alarm"],
          ["CH-1", "chiller", "fault_text"],
          ["CH-1", "chiller", "run_status"],
          ["CH-1", "chiller", "chilled_water_leaving_temp"],
          ["CH-1", "chiller", "condenser_water_entering_temp"],
        ] as Array<[string, string, QuantityKey]>
      ).map(([tag, kind, q]) => `${tag},${kind},${q},${canonicalUnitOf(q)},5,,`);
      const points = uploadPointList(db, admin, site.id, [POINT_LIST_COLUMNS.join(","), ...pointRows].join("\n"), {
        apply: true,
      });
      if (points.errors.length) throw new Error(`point list for ${site.id}: ${JSON.stringify(points.errors)}`);
      // A few of each state, spread across the list, as a large portfolio has on an ordinary day.
      if (i % 25 === 3) {
        const priority: Priority = i % 100 === 3 ? 1 : 2;
        const { book, transitions } = applyConditions(
          emptyAlarmBook(),
          [{ ruleId: "chiller_tripped", equipment: "CH-1", active: true, priority, latching: true }],
          nowMs - 60_000,
        );
        saveAlarmChanges(db, site.id, [...book.values()], transitions, new Map());
        out.alarms.set(site.id, priority);
      }
      if (i % 40 === 7) {
        const ctx = { db, nowMs };
        const visit = openVisit(ctx, tech, { siteId: site.id, mode: "remote" });
        recordTemporaryChange(ctx, tech, visit.id, {
          equipmentId: chiller.id,
          kind: "controller_setting",
          what: "Start-to-start timer",
          fromValue: "20 min",
          toValue: "5 min",
          reason: "to recover from a trip",
          putBackDueAt: new Date(nowMs + 2 * 3600_000).toISOString(),
        });
        out.changes.add(site.id);
      }
      if (i % 30 === 11) {
        createServiceRequest(
          db,
          tech,
          { siteId: site.id, description: "Noise from the tower fan", urgency: "today", callbackPhone: "555 0100" },
          nowMs,
        );
        out.requests.add(site.id);
      }
    }
    return out;
  } finally {
    db.$client.close();
  }
}
