import "server-only";
import { randomBytes } from "node:crypto";
import { and, asc, count, eq, inArray, isNull, type SQL } from "drizzle-orm";
import type { Db } from "../client";
import {
  equipment,
  equipmentLimits,
  gateways,
  organizations,
  points,
  serviceRequests,
  sites,
  visits,
  type SiteContact,
} from "../schema";
import { isAdmin, seesAllSites, type Viewer } from "@/lib/auth/viewer";
import { AppError, notFound } from "@/lib/errors";
import {
  asRefrigerant,
  compressorTypes,
  effectiveChillerLimits,
  limitValues,
  type ChillerLimitKey,
  type CompressorType,
} from "@/lib/plant/equipment-limits";
import type { Equipment, Site } from "@/lib/plant/site";
import type { EquipmentKind } from "@/lib/quantities";
import type { PointDto, SiteDetailDto, SiteRecordDto, SiteSummaryDto } from "@/lib/dto/sites";
import type { SiteBody, SitePatchBody } from "@/lib/schemas/sites";
import { writeAudit } from "./audit";

// Authorization lives here, in the queries: a customer's viewer can only ever match its
// own organization's rows, whatever the route or page above asks for. Training sites exist for
// drills only: to a customer they do not exist at all (404 like any site not theirs).
export function siteScope(viewer: Viewer): SQL | undefined {
  return seesAllSites(viewer)
    ? undefined
    : and(eq(sites.organizationId, viewer.organizationId), eq(sites.training, false));
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

/** Sites in service; a retired site is off every list (admins may ask for it with `includeRetired`). */
export const inService = isNull(sites.retiredAt);
const withRetired = (viewer: Viewer, includeRetired?: boolean) =>
  includeRetired && isAdmin(viewer) ? undefined : inService;

export function listSites(db: Db, viewer: Viewer, opts: { includeRetired?: boolean } = {}): SiteSummaryDto[] {
  const rows = db
    .select(summaryColumns)
    .from(sites)
    .innerJoin(organizations, eq(organizations.id, sites.organizationId))
    .where(and(siteScope(viewer), withRetired(viewer, opts.includeRetired)))
    .orderBy(asc(sites.name))
    .all();
  if (rows.length === 0) return [];
  const counts = new Map(
    db
      .select({ siteId: equipment.siteId, n: count() })
      .from(equipment)
      .where(
        and(
          inArray(
            equipment.siteId,
            rows.map((r) => r.id),
          ),
          isNull(equipment.retiredAt),
        ),
      )
      .groupBy(equipment.siteId)
      .all()
      .map((r) => [r.siteId, r.n]),
  );
  return rows.map((r) => toSummary(r, counts.get(r.id) ?? 0));
}

/** Service-request states still waiting for the service company. */
export const openRequestStates = ["received", "assigned", "on_the_way"] as const;

/**
 * The board's rows: every site in service the viewer may see with its training mark and its
 * open service requests and visits. Four queries whatever the number of sites, so a board of
 * hundreds of plants costs no more round trips than one of three.
 */
export function boardSiteRows(
  db: Db,
  viewer: Viewer,
): Array<SiteSummaryDto & { training: boolean; openRequests: number; openVisits: number }> {
  const scope = and(siteScope(viewer), inService);
  const rows = db
    .select({ ...summaryColumns, training: sites.training })
    .from(sites)
    .innerJoin(organizations, eq(organizations.id, sites.organizationId))
    .where(scope)
    .orderBy(asc(sites.name))
    .all();
  if (rows.length === 0) return [];
  const perSite = (list: Array<{ siteId: string; n: number }>) => new Map(list.map((r) => [r.siteId, r.n]));
  const equipmentCounts = perSite(
    db
      .select({ siteId: equipment.siteId, n: count() })
      .from(equipment)
      .innerJoin(sites, eq(sites.id, equipment.siteId))
      .where(and(scope, isNull(equipment.retiredAt)))
      .groupBy(equipment.siteId)
      .all(),
  );
  const requestCounts = perSite(
    db
      .select({ siteId: serviceRequests.siteId, n: count() })
      .from(serviceRequests)
      .innerJoin(sites, eq(sites.id, serviceRequests.siteId))
      .where(and(scope, inArray(serviceRequests.state, [...openRequestStates])))
      .groupBy(serviceRequests.siteId)
      .all(),
  );
  const visitCounts = perSite(
    db
      .select({ siteId: visits.siteId, n: count() })
      .from(visits)
      .innerJoin(sites, eq(sites.id, visits.siteId))
      .where(and(scope, isNull(visits.closedAt)))
      .groupBy(visits.siteId)
      .all(),
  );
  return rows.map(({ training, ...r }) => ({
    ...toSummary(r, equipmentCounts.get(r.id) ?? 0),
    training,
    openRequests: requestCounts.get(r.id) ?? 0,
    openVisits: visitCounts.get(r.id) ?? 0,
  }));
}

/** The ids of every site in service the viewer may see (the board's rooms, bulk checks). */
export function visibleSiteIds(db: Db, viewer: Viewer): string[] {
  return db
    .select({ id: sites.id })
    .from(sites)
    .where(and(siteScope(viewer), inService))
    .all()
    .map((r) => r.id);
}

/**
 * True when the viewer may see the site; callers answer 404 otherwise, never 403. A retired
 * site's history stays readable by id, so this does not look at `retiredAt`.
 */
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

/**
 * A site with its equipment in service (and retired equipment too with `includeRetired`, for
 * admins). A retired site is still answered by id, marked by `retiredAtMs`.
 */
export function getSite(
  db: Db,
  viewer: Viewer,
  siteId: string,
  opts: { includeRetired?: boolean } = {},
): SiteDetailDto | null {
  const row = db
    .select({
      ...summaryColumns,
      contacts: sites.contacts,
      accessNotes: sites.accessNotes,
      retiredAt: sites.retiredAt,
    })
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
      record: equipment.record,
    })
    .from(equipment)
    .where(
      and(
        eq(equipment.siteId, siteId),
        opts.includeRetired && isAdmin(viewer) ? undefined : isNull(equipment.retiredAt),
      ),
    )
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
    .map(({ record, ...e }) => ({ ...e, loop: pumpLoopOf(record), points: byEquipment.get(e.id) ?? [] }))
    .sort((a, b) => kindOrder(a.kind) - kindOrder(b.kind) || a.tag.localeCompare(b.tag, "en", { numeric: true }));
  const { contacts, accessNotes, retiredAt, ...summary } = row;
  return {
    ...toSummary(summary, equipmentDtos.length),
    equipment: equipmentDtos,
    contacts,
    accessNotes,
    retiredAtMs: retiredAt?.getTime() ?? null,
  };
}

/** A pump's loop from its record (lib/schemas/equipment.ts); null for other kinds or an older record. */
function pumpLoopOf(record: Record<string, unknown>): "chilled_water" | "condenser_water" | null {
  return record.loop === "chilled_water" || record.loop === "condenser_water" ? record.loop : null;
}

// The rule checks' view of a site, read by the alarm service (a system process, no viewer).

/**
 * A site's equipment in service as the plant calculations and rules take them, chillers with
 * their effective limits (entered over defaults). A retired site has none: its rules stop.
 */
export function siteEquipment(db: Db, siteId: string): Site {
  const site = db.select({ retiredAt: sites.retiredAt }).from(sites).where(eq(sites.id, siteId)).get();
  if (!site || site.retiredAt) return [];
  const rows = db
    .select({
      id: equipment.id,
      tag: equipment.tag,
      kind: equipment.kind,
      capacityTons: equipment.capacityTons,
      designFlowLps: equipment.designFlowLps,
      refrigerant: equipment.refrigerant,
      serves: equipment.serves,
      record: equipment.record,
    })
    .from(equipment)
    .where(and(eq(equipment.siteId, siteId), isNull(equipment.retiredAt)))
    .all();
  const chillerIds = rows.filter((e) => e.kind === "chiller").map((e) => e.id);
  const entered = chillerIds.length
    ? db.select().from(equipmentLimits).where(inArray(equipmentLimits.equipmentId, chillerIds)).all()
    : [];
  return rows.map((e) => {
    const out: Equipment = {
      tag: e.tag,
      kind: e.kind as EquipmentKind,
      capacityTons: e.capacityTons ?? undefined,
      designFlowLps: e.designFlowLps ?? undefined,
      refrigerant: e.refrigerant ?? undefined,
      serves: e.serves ?? undefined,
    };
    if (e.kind === "pump") return { ...out, loop: pumpLoopOf(e.record) ?? undefined };
    if (e.kind !== "chiller") return out;
    const compressorType = compressorTypeOf(e.record);
    const limits = effectiveChillerLimits(
      asRefrigerant(e.refrigerant),
      compressorType,
      entered
        .filter((l) => l.equipmentId === e.id)
        .map((l) => ({ key: l.key as ChillerLimitKey, value: l.value, setBy: l.setBy, setAtMs: l.setAt.getTime() })),
    );
    return {
      ...out,
      cwDesignFlowLps: positiveOf(e.record, "cwDesignFlowLps"),
      evapDesignDpKPa: positiveOf(e.record, "evapDesignDpKPa"),
      condDesignDpKPa: positiveOf(e.record, "condDesignDpKPa"),
      compressorType: compressorType ?? undefined,
      limits: limitValues(limits),
    };
  });
}

/** A positive number stored in an equipment record's field, else undefined (absent in an older record). */
function positiveOf(record: Record<string, unknown>, field: string): number | undefined {
  const v = record[field];
  return typeof v === "number" && Number.isFinite(v) && v > 0 ? v : undefined;
}

/** The compressor type stored in an equipment record, or null when absent or unknown. */
export function compressorTypeOf(record: Record<string, unknown> | null | undefined): CompressorType | null {
  const t = record?.compressorType;
  return compressorTypes.find((c) => c === t) ?? null;
}

/** True for a retired site (its rules stop); false for one in service or not stored. */
export function isSiteRetired(db: Db, siteId: string): boolean {
  return Boolean(db.select({ retiredAt: sites.retiredAt }).from(sites).where(eq(sites.id, siteId)).get()?.retiredAt);
}

/** The site's IANA time zone (clock times in alarm messages); undefined for a site not (yet) stored. */
export function siteTimeZone(db: Db, siteId: string): string | undefined {
  return db.select({ timeZone: sites.timeZone }).from(sites).where(eq(sites.id, siteId)).get()?.timeZone;
}

// ---- Site records: admins change them; every change is audited in its own transaction ----

/** A connection or a transaction on it: the reads and writes of a record change. */
export type Queryable = Pick<Db, "select" | "insert" | "update" | "delete">;

/** Only admins change records; a viewer who may not see the record got a 404 before this. */
export function requireAdminToChange(viewer: Viewer): void {
  if (!isAdmin(viewer)) throw new AppError("forbidden", "Only an admin can change plant records.");
}

const recordColumns = {
  ...summaryColumns,
  contacts: sites.contacts,
  accessNotes: sites.accessNotes,
  createdAt: sites.createdAt,
  retiredAt: sites.retiredAt,
  retiredBy: sites.retiredBy,
};

/** A site's whole record (edit form, audit before/after); retired sites are answered too. */
export function getSiteRecord(db: Queryable, viewer: Viewer, siteId: string): SiteRecordDto | null {
  const row = db
    .select(recordColumns)
    .from(sites)
    .innerJoin(organizations, eq(organizations.id, sites.organizationId))
    .where(and(eq(sites.id, siteId), siteScope(viewer)))
    .get();
  if (!row) return null;
  const { contacts, accessNotes, createdAt, retiredAt, retiredBy, ...summary } = row;
  const n = db
    .select({ n: count() })
    .from(equipment)
    .where(and(eq(equipment.siteId, siteId), isNull(equipment.retiredAt)))
    .get()!.n;
  return {
    ...toSummary(summary, n),
    contacts,
    accessNotes,
    createdAtMs: createdAt.getTime(),
    retiredAtMs: retiredAt?.getTime() ?? null,
    retiredBy,
  };
}

/** The audit trail's view of a site: the fields people edit. */
const auditedSite = (s: SiteRecordDto) => ({
  name: s.name,
  kind: s.kind,
  address: s.address,
  timeZone: s.timeZone,
  customerId: s.customer.id,
  contacts: s.contacts,
  accessNotes: s.accessNotes,
  retiredAtMs: s.retiredAtMs,
});

function slug(text: string): string {
  return (
    text
      .normalize("NFKD")
      .toLowerCase()
      .replace(/[^a-z0-9]+/g, "-")
      .replace(/^-+|-+$/g, "")
      .slice(0, 40) || "site"
  );
}

/** Readable and unique: the name's slug, with a short random suffix when taken. */
function newSiteId(db: Queryable, name: string): string {
  const base = slug(name);
  for (let i = 0; ; i++) {
    const id = i === 0 ? base : `${base}-${randomBytes(3).toString("hex")}`;
    if (!db.select({ id: sites.id }).from(sites).where(eq(sites.id, id)).get()) return id;
  }
}

/** A new site of a customer in service. `id` is for the demo seed's fixed ids. */
export function insertSite(db: Db, viewer: Viewer, body: SiteBody, id?: string): SiteRecordDto {
  const customer = db
    .select({ id: organizations.id, retiredAt: organizations.retiredAt })
    .from(organizations)
    .where(
      and(
        eq(organizations.id, body.customerId),
        eq(organizations.kind, "customer"),
        seesAllSites(viewer) ? undefined : eq(organizations.id, viewer.organizationId),
      ),
    )
    .get();
  if (!customer)
    throw new AppError("bad_request", "The request is not valid.", [
      { path: "customerId", message: "No such customer" },
    ]);
  requireAdminToChange(viewer);
  if (customer.retiredAt)
    throw new AppError("conflict", "This customer is retired; restore it first.", [
      { path: "customerId", message: "The customer is retired" },
    ]);
  return db.transaction(
    (tx) => {
      const siteId = id ?? newSiteId(tx, body.name);
      if (tx.select({ id: sites.id }).from(sites).where(eq(sites.id, siteId)).get())
        throw new AppError("conflict", "A site with this id exists.");
      tx.insert(sites)
        .values({
          id: siteId,
          name: body.name,
          kind: body.kind,
          address: body.address,
          timeZone: body.timeZone,
          organizationId: body.customerId,
          contacts: body.contacts as SiteContact[],
          accessNotes: body.accessNotes,
        })
        .run();
      const created = getSiteRecord(tx, viewer, siteId)!;
      writeAudit(tx, viewer, {
        action: "create",
        entityType: "site",
        entityId: siteId,
        siteId,
        summary: `Added site ${body.name}`,
        after: auditedSite(created),
      });
      return created;
    },
    { behavior: "immediate" },
  );
}

export function updateSite(db: Db, viewer: Viewer, siteId: string, patch: SitePatchBody): SiteRecordDto {
  return db.transaction(
    (tx) => {
      const before = getSiteRecord(tx, viewer, siteId);
      if (!before) throw notFound("No such site.");
      requireAdminToChange(viewer);
      const set = Object.fromEntries(Object.entries(patch).filter(([, v]) => v !== undefined));
      if (Object.keys(set).length === 0) return before;
      tx.update(sites).set(set).where(eq(sites.id, siteId)).run();
      const after = getSiteRecord(tx, viewer, siteId)!;
      writeAudit(tx, viewer, {
        action: "update",
        entityType: "site",
        entityId: siteId,
        siteId,
        summary: `Edited site ${after.name} (${Object.keys(set).join(", ")})`,
        before: auditedSite(before),
        after: auditedSite(after),
      });
      return after;
    },
    { behavior: "immediate" },
  );
}

/**
 * Retires (or restores) a site inside the caller's transaction: kept with its history, off the
 * board and the lists. Null when it already was so.
 */
export function setSiteRetiredIn(
  tx: Queryable,
  viewer: Viewer,
  siteId: string,
  retired: boolean,
  atMs = Date.now(),
): SiteRecordDto | null {
  const before = getSiteRecord(tx, viewer, siteId);
  if (!before) throw notFound("No such site.");
  requireAdminToChange(viewer);
  if ((before.retiredAtMs !== null) === retired) return null;
  if (!retired) {
    const owner = tx
      .select({ retiredAt: organizations.retiredAt })
      .from(organizations)
      .where(eq(organizations.id, before.customer.id))
      .get();
    if (owner?.retiredAt) throw new AppError("conflict", "The site's customer is retired; restore the customer first.");
  }
  tx.update(sites)
    .set(retired ? { retiredAt: new Date(atMs), retiredBy: viewer.userId } : { retiredAt: null, retiredBy: null })
    .where(eq(sites.id, siteId))
    .run();
  const after = getSiteRecord(tx, viewer, siteId)!;
  writeAudit(
    tx,
    viewer,
    {
      action: retired ? "retire" : "restore",
      entityType: "site",
      entityId: siteId,
      siteId,
      summary: `${retired ? "Retired" : "Restored"} site ${after.name}`,
      before: auditedSite(before),
      after: auditedSite(after),
    },
    atMs,
  );
  return after;
}

export function setSiteRetired(db: Db, viewer: Viewer, siteId: string, retired: boolean): SiteRecordDto | null {
  return db.transaction((tx) => setSiteRetiredIn(tx, viewer, siteId, retired), { behavior: "immediate" });
}

/** The gateways of a site (to cut their connections when it retires). */
export function siteGatewayIds(db: Queryable, siteId: string): string[] {
  return db
    .select({ id: gateways.id })
    .from(gateways)
    .where(eq(gateways.siteId, siteId))
    .all()
    .map((g) => g.id);
}
