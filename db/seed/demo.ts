import bcrypt from "bcryptjs";
import { and, eq, inArray } from "drizzle-orm";
import type { Db } from "../client";
import { hashPasswordSync, needsRehash } from "../password";
import { equipment, onCallShifts, organizations, sites, users } from "../schema";
import { systemViewer, type Viewer } from "@/lib/auth/viewer";
import { chillerLimitDefaults } from "@/lib/plant/equipment-limits";
import { fToC, WATER_HEAT_CAPACITY_KJ_PER_LK } from "@/lib/plant/units";
import { canonicalUnitOf, type EquipmentKind } from "@/lib/quantities";
import type { EquipmentInput } from "@/lib/schemas/equipment";
import { createCustomer, createEquipment, createSite, setEquipmentLimits } from "@/lib/server/plant-records";
import { siteLayouts, type SiteLayout } from "@/simulator/layout";
import { pointsOf } from "@/simulator/points";
import { uploadPointList } from "@/lib/server/points";
import { POINT_LIST_COLUMNS } from "@/lib/point-list-csv";
import { chillerParamsOf } from "@/simulator/params";

// An invented service company and three invented customers. Ids are fixed so the seed is
// idempotent (re-running inserts nothing) and demo URLs stay stable.

export const SERVICE_ORG = { id: "org-tallgrass", name: "Tallgrass Mechanical Service", kind: "service" as const };

/** A demo record as an administrator would enter it, plus the simulator's own cut-out for chillers. */
type DemoEquipment = EquipmentInput & { kind: EquipmentKind; highCondTripKPa?: number };

interface DemoSite {
  id: string;
  /** The simulator layout that drives this site in demo mode; the equipment follows it. */
  layout: string;
  name: string;
  kind: string;
  address: string;
  timeZone: string;
  contacts: { name: string; role: string; phone: string; email: string }[];
  accessNotes: string;
  customer: { id: string; name: string; userEmail: string; userName: string };
  equipment: DemoEquipment[];
}

// 2.4 gpm/ton chilled water and 3 gpm/ton condenser water (AHRI 550/590 rating flows), in L/s.
const GPM_TO_LPS = 0.0630902;
const chwFlow = (tons: number) => Math.round(tons * 2.4 * GPM_TO_LPS * 10) / 10;
const cwFlow = (tons: number) => Math.round(tons * 3 * GPM_TO_LPS * 10) / 10;
const round1 = (x: number) => Math.round(x * 10) / 10;
/** Pump heads at design flow: ≈ 50 ft chilled water, ≈ 35 ft condenser water (common practice, recalled). */
const CHW_PUMP_HEAD_KPA = 150;
const CW_PUMP_HEAD_KPA = 105;

function plant(layout: SiteLayout): DemoEquipment[] {
  // The simulator's own model of each chiller: design flows, condenser range and its cut-out.
  const params = chillerParamsOf(layout);
  const d = layout.design;
  // Towers are sized for heat rejection ≈ 1.25 × the load (REFERENCES.md §5).
  const towerTons = Math.round(layout.chillers.reduce((n, c) => n + c.capacityTons, 0) * 1.25);
  const list: DemoEquipment[] = [];
  layout.chillers.forEach((c, i) => {
    const n = i + 1;
    const p = params[i];
    const cwRangeK = (p.ratedEvapKW + p.ratedInputKW) / (p.cwDesignLps * WATER_HEAT_CAPACITY_KJ_PER_LK);
    list.push({
      kind: "chiller",
      tag: `CH-${n}`,
      name: `Chiller ${n}`,
      capacityTons: c.capacityTons,
      refrigerant: c.refrigerant,
      // The simulated chillers are variable-speed centrifugals whose motor and drive are cooled by refrigerant.
      compressorType: "centrifugal_vsd_oil_free",
      chwDesignFlowLps: chwFlow(c.capacityTons),
      cwDesignFlowLps: cwFlow(c.capacityTons),
      chwEnteringDesignC: round1(fToC(d.chwReturnF)),
      chwLeavingDesignC: round1(fToC(d.chwSupplyF)),
      cwEnteringDesignC: round1(fToC(d.cwEnteringF)),
      cwLeavingDesignC: round1(fToC(d.cwEnteringF) + cwRangeK),
      // Barrel pressure drops at design flow, as on the chiller's rating sheet.
      evapDesignDpKPa: round1(p.evapDpDesignKPa),
      condDesignDpKPa: round1(p.condDpDesignKPa),
      highCondTripKPa: p.highCondTripKPa,
    });
    list.push({
      kind: "pump",
      tag: `CHWP-${n}`,
      name: `Chilled water pump ${n}`,
      designFlowLps: chwFlow(c.capacityTons),
      designHeadKPa: CHW_PUMP_HEAD_KPA,
      loop: "chilled_water",
      serves: `CH-${n}`,
    });
    list.push({
      kind: "pump",
      tag: `CWP-${n}`,
      name: `Condenser water pump ${n}`,
      designFlowLps: cwFlow(c.capacityTons),
      designHeadKPa: CW_PUMP_HEAD_KPA,
      loop: "condenser_water",
      serves: `CH-${n}`,
    });
  });
  list.push({
    kind: "cooling_tower",
    tag: "CT-1",
    name: "Cooling tower 1",
    capacityTons: towerTons,
    fanDrive: "variable_speed",
    // The simulator's tower holds condenser water at the design entering temperature, fan no lower than 20 %.
    condenserWaterSetpointC: round1(fToC(d.cwEnteringF)),
    fanMinSpeedPct: 20,
    serves: null,
  });
  for (let i = 1; i <= layout.airHandlers; i++)
    list.push({ kind: "air_handler", tag: `AHU-${i}`, name: `Air handler ${i}`, serves: "chw-loop" });
  list.push({ kind: "weather_station", tag: "WS-1", name: "Weather station" });
  return list;
}

export const DEMO_SITES: DemoSite[] = [
  {
    id: "harborview-mob",
    name: "Harborview Medical Office Building",
    kind: "Medical office",
    address: "1450 Larkspur Avenue, Riverton",
    timeZone: "America/Chicago",
    contacts: [
      { name: "Morgan Ellis", role: "Facilities manager", phone: "555-0142", email: "facilities@harborview.example" },
    ],
    accessNotes: "After hours: security desk at the north entrance lets you in; plant room key is in the lock box.",
    customer: {
      id: "org-harborview",
      name: "Harborview Medical Partners",
      userEmail: "facilities@harborview.example",
      userName: "Morgan Ellis",
    },
    layout: "medical-office",
    equipment: plant(siteLayouts["medical-office"]),
  },
  {
    id: "quarry-ridge-dh2",
    name: "Quarry Ridge Data Hall 2",
    kind: "Data hall",
    address: "88 Flint Quarry Road, Ashbury",
    timeZone: "America/Chicago",
    contacts: [{ name: "Sam Achebe", role: "Operations lead", phone: "555-0177", email: "ops@quarryridge.example" }],
    accessNotes: "24/7 staffed: sign in at the guard house with photo ID; escort required in the data hall.",
    customer: {
      id: "org-quarry-ridge",
      name: "Quarry Ridge Data Centers",
      userEmail: "ops@quarryridge.example",
      userName: "Sam Achebe",
    },
    layout: "data-hall",
    equipment: plant(siteLayouts["data-hall"]),
  },
  {
    id: "millbrook-high",
    name: "Millbrook High School",
    kind: "School",
    address: "300 Schoolhouse Lane, Millbrook",
    timeZone: "America/New_York",
    contacts: [
      {
        name: "Jordan Whitfield",
        role: "Facilities director",
        phone: "555-0190",
        email: "facilities@millbrook.example",
      },
    ],
    accessNotes: "Gate code is with the district's night custodian; plant room is behind the gym, door B4.",
    customer: {
      id: "org-millbrook",
      name: "Millbrook Unified School District",
      userEmail: "facilities@millbrook.example",
      userName: "Jordan Whitfield",
    },
    layout: "school",
    equipment: plant(siteLayouts.school),
  },
];

export const DEMO_STAFF = [
  { id: "user-admin", email: "admin@tallgrass.example", name: "Dana Okafor", role: "admin" as const },
  { id: "user-tech-1", email: "luis@tallgrass.example", name: "Luis Ferreira", role: "technician" as const },
  { id: "user-tech-2", email: "priya@tallgrass.example", name: "Priya Raman", role: "technician" as const },
];

export interface DemoAccount {
  role: "admin" | "technician" | "customer";
  email: string;
  name: string;
  organization: string;
}

export function demoAccounts(): DemoAccount[] {
  return [
    ...DEMO_STAFF.map((s) => ({ role: s.role, email: s.email, name: s.name, organization: SERVICE_ORG.name })),
    ...DEMO_SITES.map((s) => ({
      role: "customer" as const,
      email: s.customer.userEmail,
      name: s.customer.userName,
      organization: s.customer.name,
    })),
  ];
}

/**
 * Customers, sites and equipment through the same functions the API calls, as the system
 * viewer; what exists already (fixed ids, tags) is left alone.
 */
function seedRecords(db: Db): number {
  const viewer = systemViewer(SERVICE_ORG.id);
  let created = 0;
  for (const site of DEMO_SITES) {
    const { customer } = site;
    if (!db.select({ id: organizations.id }).from(organizations).where(eq(organizations.id, customer.id)).get()) {
      createCustomer(db, viewer, { name: customer.name }, { id: customer.id });
      created++;
    }
    if (!db.select({ id: sites.id }).from(sites).where(eq(sites.id, site.id)).get()) {
      createSite(
        db,
        viewer,
        {
          customerId: customer.id,
          name: site.name,
          kind: site.kind,
          address: site.address,
          timeZone: site.timeZone,
          contacts: site.contacts,
          accessNotes: site.accessNotes,
        },
        { id: site.id },
      );
      created++;
    }
    for (const { highCondTripKPa, ...e } of site.equipment) {
      const exists = db
        .select({ id: equipment.id })
        .from(equipment)
        .where(and(eq(equipment.siteId, site.id), eq(equipment.tag, e.tag)))
        .get();
      if (exists) continue;
      const made = createEquipment(db, viewer, site.id, e);
      created++;
      if (e.kind !== "chiller" || highCondTripKPa === undefined) continue;
      // The rule should trip where the simulated plant trips: enter its cut-out when the default differs.
      const byDefault = chillerLimitDefaults(e.refrigerant, e.compressorType).highCondPressureCutoutKPa.value;
      if (Math.abs(byDefault - highCondTripKPa) > 0.5)
        setEquipmentLimits(db, viewer, made.id, {
          values: { highCondPressureCutoutKPa: Math.round(highCondTripKPa * 10) / 10 },
        });
    }
  }
  return created;
}

/** Seeds the demo scenario; safe to run on every start (existing rows are left alone). */
export function seedDemo(db: Db, demoPassword: string): { inserted: number } {
  // One hash for every demo account: they share the documented demo password, hashed at the cost
  // of every other account so sign-in time tells a demo account from no account at all.
  const passwordHash = hashPasswordSync(demoPassword);
  let inserted = 0;
  const count = (r: { changes: number }) => (inserted += r.changes);

  // The service company is the deployment itself, not a record an administrator adds.
  count(db.insert(organizations).values(SERVICE_ORG).onConflictDoNothing().run());
  inserted += seedRecords(db);
  inserted += seedPoints(db);

  db.transaction(
    (tx) => {
      for (const staff of DEMO_STAFF) {
        count(
          tx
            .insert(users)
            .values({ ...staff, organizationId: SERVICE_ORG.id, passwordHash, passwordSetAt: new Date() })
            .onConflictDoNothing()
            .run(),
        );
      }
      for (const site of DEMO_SITES) {
        const { customer } = site;
        count(
          tx
            .insert(users)
            .values({
              id: `user-${customer.id}`,
              email: customer.userEmail,
              name: customer.userName,
              role: "customer",
              organizationId: customer.id,
              passwordHash,
              passwordSetAt: new Date(),
            })
            .onConflictDoNothing()
            .run(),
        );
      }
      // Two weeks of on-call from the first start: the technicians take turns, each backing the other.
      const weekMs = 7 * 24 * 3600_000;
      const from = Date.now() - 3600_000;
      count(
        tx
          .insert(onCallShifts)
          .values({
            id: "demo-shift-1",
            startsAt: from,
            endsAt: from + weekMs,
            primaryUserId: "user-tech-1",
            backupUserId: "user-tech-2",
          })
          .onConflictDoNothing()
          .run(),
      );
      count(
        tx
          .insert(onCallShifts)
          .values({
            id: "demo-shift-2",
            startsAt: from + weekMs,
            endsAt: from + 2 * weekMs,
            primaryUserId: "user-tech-2",
            backupUserId: "user-tech-1",
          })
          .onConflictDoNothing()
          .run(),
      );
    },
    { behavior: "immediate" },
  );
  upgradeDemoHashes(db, demoPassword, passwordHash);
  return { inserted };
}

/**
 * Each site's points, as an administrator would add them: one point-list CSV per site, through the
 * same upload the import page uses. Rows already there are planned as unchanged and left alone.
 */
function seedPoints(db: Db): number {
  const viewer = systemViewer(SERVICE_ORG.id);
  let created = 0;
  for (const site of DEMO_SITES) {
    const layout = siteLayouts[site.layout];
    const rows = site.equipment.flatMap((e) =>
      pointsOf(layout, e.kind).map((q) => `${e.tag},${e.kind},${q},${canonicalUnitOf(q)},5,,`),
    );
    const csv = [POINT_LIST_COLUMNS.join(","), ...rows].join("\n");
    const result = uploadPointList(db, viewer, site.id, csv, { apply: true });
    if (result.errors.length > 0)
      throw new Error(
        `demo point list for ${site.id}: ${result.errors.map((e) => `line ${e.line}: ${e.message}`).join("; ")}`,
      );
    if (result.applied) created += result.plan.counts.create;
  }
  return created;
}

/** Demo accounts seeded at a lower bcrypt cost by an older version get the common cost. */
function upgradeDemoHashes(db: Db, demoPassword: string, passwordHash: string): void {
  const ids = [...DEMO_STAFF.map((s) => s.id), ...DEMO_SITES.map((s) => `user-${s.customer.id}`)];
  const rows = db.select({ id: users.id, hash: users.passwordHash }).from(users).where(inArray(users.id, ids)).all();
  for (const row of rows) {
    if (!needsRehash(row.hash) || !bcrypt.compareSync(demoPassword, row.hash)) continue;
    db.update(users).set({ passwordHash }).where(eq(users.id, row.id)).run();
  }
}

/**
 * A simulated plant's equipment, limits and points on a site (a training site), as the demo sites get
 * theirs: the equipment follows the simulator layout, so the rules trip where the model trips.
 */
export function addSimulatedPlant(db: Db, viewer: Viewer, siteId: string, layoutName: string): number {
  const layout = siteLayouts[layoutName];
  if (!layout) throw new Error(`unknown layout ${layoutName}`);
  const list = plant(layout);
  for (const { highCondTripKPa, ...e } of list) {
    const made = createEquipment(db, viewer, siteId, e);
    if (e.kind !== "chiller" || highCondTripKPa === undefined) continue;
    const byDefault = chillerLimitDefaults(e.refrigerant, e.compressorType).highCondPressureCutoutKPa.value;
    if (Math.abs(byDefault - highCondTripKPa) > 0.5)
      setEquipmentLimits(db, viewer, made.id, {
        values: { highCondPressureCutoutKPa: Math.round(highCondTripKPa * 10) / 10 },
      });
  }
  const rows = list.flatMap((e) =>
    pointsOf(layout, e.kind).map((q) => `${e.tag},${e.kind},${q},${canonicalUnitOf(q)},5,,`),
  );
  const result = uploadPointList(db, viewer, siteId, [POINT_LIST_COLUMNS.join(","), ...rows].join("\n"), {
    apply: true,
  });
  if (result.errors.length > 0) throw new Error(`training point list: ${result.errors[0].message}`);
  return list.length;
}
