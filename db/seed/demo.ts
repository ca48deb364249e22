import bcrypt from "bcryptjs";
import { eq, inArray } from "drizzle-orm";
import type { Db } from "../client";
import { hashPasswordSync, needsRehash } from "../password";
import { equipment, onCallShifts, organizations, points, sites, users, type NewEquipment } from "../schema";
import { canonicalUnitOf, pointsByKind, quantities, type EquipmentKind } from "@/lib/quantities";
import { siteLayouts, type SiteLayout } from "@/simulator/layout";

// An invented service company and three invented customers. Ids are fixed so the seed is
// idempotent (re-running inserts nothing) and demo URLs stay stable.

export const SERVICE_ORG = { id: "org-tallgrass", name: "Tallgrass Mechanical Service", kind: "service" as const };

interface DemoEquipment {
  tag: string;
  name: string;
  kind: EquipmentKind;
  capacityTons?: number;
  designFlowLps?: number;
  refrigerant?: string;
  serves?: string;
}

interface DemoSite {
  id: string;
  /** The simulator layout that drives this site in demo mode; the equipment follows it. */
  layout: string;
  name: string;
  kind: string;
  address: string;
  timeZone: string;
  customer: { id: string; name: string; userEmail: string; userName: string };
  equipment: DemoEquipment[];
}

// 2.4 gpm/ton chilled water and 3 gpm/ton condenser water (AHRI 550/590 rating flows), in L/s.
const GPM_TO_LPS = 0.0630902;
const chwFlow = (tons: number) => Math.round(tons * 2.4 * GPM_TO_LPS * 10) / 10;
const cwFlow = (tons: number) => Math.round(tons * 3 * GPM_TO_LPS * 10) / 10;

function plant(layout: SiteLayout): DemoEquipment[] {
  const chillers = layout.chillers.map((c) => ({ tons: c.capacityTons, refrigerant: c.refrigerant }));
  // Towers are sized for heat rejection ≈ 1.25 × the load (REFERENCES.md §5).
  const towerTons = Math.round(chillers.reduce((n, c) => n + c.tons, 0) * 1.25);
  const list: DemoEquipment[] = [];
  chillers.forEach((c, i) => {
    const n = i + 1;
    list.push({
      tag: `CH-${n}`,
      name: `Chiller ${n}`,
      kind: "chiller",
      capacityTons: c.tons,
      refrigerant: c.refrigerant,
      designFlowLps: chwFlow(c.tons),
    });
    list.push({
      tag: `CHWP-${n}`,
      name: `Chilled water pump ${n}`,
      kind: "pump",
      designFlowLps: chwFlow(c.tons),
      serves: `CH-${n}`,
    });
    list.push({
      tag: `CWP-${n}`,
      name: `Condenser water pump ${n}`,
      kind: "pump",
      designFlowLps: cwFlow(c.tons),
      serves: `CH-${n}`,
    });
  });
  list.push({ tag: "CT-1", name: "Cooling tower 1", kind: "cooling_tower", capacityTons: towerTons });
  for (let i = 1; i <= layout.airHandlers; i++)
    list.push({ tag: `AHU-${i}`, name: `Air handler ${i}`, kind: "air_handler" });
  list.push({ tag: "WS-1", name: "Weather station", kind: "weather_station" });
  return list;
}

export const DEMO_SITES: DemoSite[] = [
  {
    id: "harborview-mob",
    name: "Harborview Medical Office Building",
    kind: "Medical office",
    address: "1450 Larkspur Avenue, Riverton",
    timeZone: "America/Chicago",
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

/** Seeds the demo scenario; safe to run on every start (existing rows are left alone). */
export function seedDemo(db: Db, demoPassword: string): { inserted: number } {
  // One hash for every demo account: they share the documented demo password, hashed at the cost
  // of every other account so sign-in time tells a demo account from no account at all.
  const passwordHash = hashPasswordSync(demoPassword);
  let inserted = 0;
  const count = (r: { changes: number }) => (inserted += r.changes);

  db.transaction(
    (tx) => {
      count(tx.insert(organizations).values(SERVICE_ORG).onConflictDoNothing().run());
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
            .insert(organizations)
            .values({ id: customer.id, name: customer.name, kind: "customer" })
            .onConflictDoNothing()
            .run(),
        );
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
        count(
          tx
            .insert(sites)
            .values({
              id: site.id,
              name: site.name,
              kind: site.kind,
              address: site.address,
              timeZone: site.timeZone,
              organizationId: customer.id,
            })
            .onConflictDoNothing()
            .run(),
        );
        for (const e of site.equipment) {
          const equipmentId = `${site.id}:${e.tag}`;
          const row: NewEquipment = { id: equipmentId, siteId: site.id, ...e };
          count(tx.insert(equipment).values(row).onConflictDoNothing().run());
          for (const key of pointsByKind[e.kind]) {
            count(
              tx
                .insert(points)
                .values({
                  equipmentId,
                  key,
                  quantity: key,
                  unit: canonicalUnitOf(key),
                  brickClass: quantities[key].brickClass,
                  expectedIntervalS: 5,
                })
                .onConflictDoNothing()
                .run(),
            );
          }
        }
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

/** Demo accounts seeded at a lower bcrypt cost by an older version get the common cost. */
function upgradeDemoHashes(db: Db, demoPassword: string, passwordHash: string): void {
  const ids = [...DEMO_STAFF.map((s) => s.id), ...DEMO_SITES.map((s) => `user-${s.customer.id}`)];
  const rows = db.select({ id: users.id, hash: users.passwordHash }).from(users).where(inArray(users.id, ids)).all();
  for (const row of rows) {
    if (!needsRehash(row.hash) || !bcrypt.compareSync(demoPassword, row.hash)) continue;
    db.update(users).set({ passwordHash }).where(eq(users.id, row.id)).run();
  }
}
