import "server-only";
import { and, asc, count, eq, inArray, type SQL } from "drizzle-orm";
import type { Db } from "../client";
import { equipment, organizations, points, sites } from "../schema";
import { seesAllSites, type Viewer } from "@/lib/auth/viewer";
import type { Site } from "@/lib/plant/site";
import type { EquipmentKind } from "@/lib/quantities";
import type { PointDto, SiteDetailDto, SiteSummaryDto } from "@/lib/dto/sites";

// Authorization lives here, in the queries: a customer's viewer can only ever match its
// own organization's rows, whatever the route or page above asks for.
export function siteScope(viewer: Viewer): SQL | undefined {
  return seesAllSites(viewer) ? undefined : eq(sites.organizationId, viewer.organizationId);
}

const summaryColumns = {
  id: sites.id,
  name: sites.name,
  kind: sites.kind,
  address: sites.address,
  timeZone: sites.timeZone,
  customerId: organizations.id,
  customerName: organizations.name,
};

type SummaryRow = {
  id: string;
  name: string;
  kind: string;
  address: string;
  timeZone: string;
  customerId: string;
  customerName: string;
};

function toSummary(row: SummaryRow, equipmentCount: number): SiteSummaryDto {
  const { customerId, customerName, ...site } = row;
  return { ...site, customer: { id: customerId, name: customerName }, equipmentCount };
}

export function listSites(db: Db, viewer: Viewer): SiteSummaryDto[] {
  const rows = db
    .select(summaryColumns)
    .from(sites)
    .innerJoin(organizations, eq(organizations.id, sites.organizationId))
    .where(siteScope(viewer))
    .orderBy(asc(sites.name))
    .all();
  if (rows.length === 0) return [];
  const counts = new Map(
    db
      .select({ siteId: equipment.siteId, n: count() })
      .from(equipment)
      .where(
        inArray(
          equipment.siteId,
          rows.map((r) => r.id),
        ),
      )
      .groupBy(equipment.siteId)
      .all()
      .map((r) => [r.siteId, r.n]),
  );
  return rows.map((r) => toSummary(r, counts.get(r.id) ?? 0));
}

/** The ids of every site the viewer may see (for socket rooms and bulk checks). */
export function visibleSiteIds(db: Db, viewer: Viewer): string[] {
  return db
    .select({ id: sites.id })
    .from(sites)
    .where(siteScope(viewer))
    .all()
    .map((r) => r.id);
}

/** True when the viewer may see the site; callers answer 404 otherwise, never 403. */
export function canSeeSite(db: Db, viewer: Viewer, siteId: string): boolean {
  return (
    db
      .select({ id: sites.id })
      .from(sites)
      .where(and(eq(sites.id, siteId), siteScope(viewer)))
      .get() !== undefined
  );
}

// The order a technician walks a plant in: the chillers, heat rejection, pumps, then the load.
const KIND_ORDER = ["chiller", "cooling_tower", "pump", "air_handler", "weather_station"];
const kindOrder = (kind: string) => {
  const i = KIND_ORDER.indexOf(kind);
  return i === -1 ? KIND_ORDER.length : i;
};

export function getSite(db: Db, viewer: Viewer, siteId: string): SiteDetailDto | null {
  const row = db
    .select(summaryColumns)
    .from(sites)
    .innerJoin(organizations, eq(organizations.id, sites.organizationId))
    .where(and(eq(sites.id, siteId), siteScope(viewer)))
    .get();
  if (!row) return null;
  const equipmentRows = db
    .select({
      id: equipment.id,
      tag: equipment.tag,
      name: equipment.name,
      kind: equipment.kind,
      capacityTons: equipment.capacityTons,
      designFlowLps: equipment.designFlowLps,
      refrigerant: equipment.refrigerant,
      serves: equipment.serves,
    })
    .from(equipment)
    .where(eq(equipment.siteId, siteId))
    .orderBy(asc(equipment.tag))
    .all();
  const pointRows = equipmentRows.length
    ? db
        .select({
          id: points.id,
          equipmentId: points.equipmentId,
          key: points.key,
          quantity: points.quantity,
          unit: points.unit,
          brickClass: points.brickClass,
          expectedIntervalS: points.expectedIntervalS,
          lowLimit: points.lowLimit,
          highLimit: points.highLimit,
        })
        .from(points)
        .where(
          inArray(
            points.equipmentId,
            equipmentRows.map((e) => e.id),
          ),
        )
        .orderBy(asc(points.id))
        .all()
    : [];
  const byEquipment = new Map<string, PointDto[]>();
  for (const { equipmentId, ...p } of pointRows) {
    const list = byEquipment.get(equipmentId) ?? [];
    list.push(p);
    byEquipment.set(equipmentId, list);
  }
  const equipmentDtos = equipmentRows
    .map((e) => ({ ...e, points: byEquipment.get(e.id) ?? [] }))
    .sort((a, b) => kindOrder(a.kind) - kindOrder(b.kind) || a.tag.localeCompare(b.tag, "en", { numeric: true }));
  return { ...toSummary(row, equipmentDtos.length), equipment: equipmentDtos };
}

// The rule checks' view of a site, read by the alarm service (a system process, no viewer).

/** A site's equipment records as the plant calculations take them. */
export function siteEquipment(db: Db, siteId: string): Site {
  return db
    .select({
      tag: equipment.tag,
      kind: equipment.kind,
      capacityTons: equipment.capacityTons,
      designFlowLps: equipment.designFlowLps,
      refrigerant: equipment.refrigerant,
      serves: equipment.serves,
    })
    .from(equipment)
    .where(eq(equipment.siteId, siteId))
    .all()
    .map((e) => ({
      tag: e.tag,
      kind: e.kind as EquipmentKind,
      capacityTons: e.capacityTons ?? undefined,
      designFlowLps: e.designFlowLps ?? undefined,
      refrigerant: e.refrigerant ?? undefined,
      serves: e.serves ?? undefined,
    }));
}

/** The site's IANA time zone (clock times in alarm messages); undefined for a site not (yet) stored. */
export function siteTimeZone(db: Db, siteId: string): string | undefined {
  return db.select({ timeZone: sites.timeZone }).from(sites).where(eq(sites.id, siteId)).get()?.timeZone;
}
