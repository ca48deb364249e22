import "server-only";
import { and, asc, count, eq, isNull, ne } from "drizzle-orm";
import type { Db } from "../client";
import { equipment, gatewayPointMaps, gateways, organizations, sites, users } from "../schema";
import { isAdmin, type Viewer } from "@/lib/auth/viewer";
import type { SetupProgress } from "@/lib/dto/setup";

const n = (rows: { n: number } | undefined) => rows?.n ?? 0;

/** How far a new deployment has come, step by step (administrators only: it counts every customer's records). */
export function setupProgress(db: Db, viewer: Viewer): SetupProgress | null {
  if (!isAdmin(viewer)) return null;
  const customers = n(
    db
      .select({ n: count() })
      .from(organizations)
      .where(and(eq(organizations.kind, "customer"), isNull(organizations.retiredAt)))
      .get(),
  );
  const siteCount = n(db.select({ n: count() }).from(sites).where(isNull(sites.retiredAt)).get());
  const equipmentCount = n(db.select({ n: count() }).from(equipment).where(isNull(equipment.retiredAt)).get());
  const gatewayCount = n(db.select({ n: count() }).from(gateways).where(isNull(gateways.revokedAt)).get());
  const mappedPoints = n(db.select({ n: count() }).from(gatewayPointMaps).get());
  const otherPeople = n(db.select({ n: count() }).from(users).where(ne(users.id, viewer.userId)).get());
  const firstCustomer = db
    .select({ id: organizations.id })
    .from(organizations)
    .where(and(eq(organizations.kind, "customer"), isNull(organizations.retiredAt)))
    .orderBy(asc(organizations.createdAt), asc(organizations.id))
    .get();
  const firstSite = db
    .select({ id: sites.id })
    .from(sites)
    .where(isNull(sites.retiredAt))
    .orderBy(asc(sites.createdAt), asc(sites.id))
    .get();
  return {
    customers,
    sites: siteCount,
    equipment: equipmentCount,
    gateways: gatewayCount,
    mappedPoints,
    otherPeople,
    firstCustomerId: firstCustomer?.id ?? null,
    firstSiteId: firstSite?.id ?? null,
  };
}
