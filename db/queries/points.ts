import "server-only";
import { and, asc, eq, inArray, sql } from "drizzle-orm";
import type { Db } from "../client";
import { equipment, gatewayPointMaps, points, readings, sites } from "../schema";
import { writeAudit, writeAudits, type AuditEntry } from "./audit";
import { siteScope } from "./sites";
import { isAdmin, type Viewer } from "@/lib/auth/viewer";
import { AppError, notFound } from "@/lib/errors";
import {
  planPointList,
  type PointListError,
  type PointListPlan,
  type PointListRow,
  type PointValues,
  type PlannedPoint,
} from "@/lib/point-list-csv";
import {
  canonicalUnitOf,
  isQuantityKey,
  quantityFitsKind,
  quantities,
  type EquipmentKind,
  type QuantityKey,
} from "@/lib/quantities";
import type { SiteModel } from "@/lib/open-formats/model";
import type { PointDetailDto } from "@/lib/dto/points";
import type { PointDto } from "@/lib/dto/sites";

// Points of a site's equipment. Authorization is here: every read goes through the viewer's
// site scope (a customer matches only its own organization's sites; anything else is 404), and
// every write is an administrator's, audited in the transaction that makes it.

const pointColumns = {
  id: points.id,
  key: points.key,
  quantity: points.quantity,
  unit: points.unit,
  brickClass: points.brickClass,
  expectedIntervalS: points.expectedIntervalS,
  lowLimit: points.lowLimit,
  highLimit: points.highLimit,
};

interface VisibleEquipment {
  id: string;
  siteId: string;
  tag: string;
  kind: string;
  retired: boolean;
  siteRetired: boolean;
}

function visibleEquipment(db: Db, viewer: Viewer, equipmentId: string): VisibleEquipment | null {
  const row = db
    .select({
      id: equipment.id,
      siteId: equipment.siteId,
      tag: equipment.tag,
      kind: equipment.kind,
      retiredAt: equipment.retiredAt,
      siteRetiredAt: sites.retiredAt,
    })
    .from(equipment)
    .innerJoin(sites, eq(sites.id, equipment.siteId))
    .where(and(eq(equipment.id, equipmentId), siteScope(viewer)))
    .get();
  if (!row) return null;
  const { retiredAt, siteRetiredAt, ...rest } = row;
  return { ...rest, retired: retiredAt !== null, siteRetired: siteRetiredAt !== null };
}

function requireAdmin(viewer: Viewer) {
  if (!isAdmin(viewer)) throw new AppError("forbidden", "Only an administrator can change points.");
}

function requireActive(e: VisibleEquipment) {
  if (e.siteRetired) throw new AppError("conflict", "This site is retired; its points cannot be changed.");
  if (e.retired) throw new AppError("conflict", `${e.tag} is retired; its points cannot be changed.`);
}

export function listEquipmentPoints(db: Db, viewer: Viewer, equipmentId: string): PointDto[] {
  if (!visibleEquipment(db, viewer, equipmentId)) throw notFound("No such equipment.");
  return db.select(pointColumns).from(points).where(eq(points.equipmentId, equipmentId)).orderBy(asc(points.id)).all();
}

function pointRow(db: Db, viewer: Viewer, pointId: number) {
  return db
    .select({
      ...pointColumns,
      equipmentId: equipment.id,
      equipmentTag: equipment.tag,
      equipmentKind: equipment.kind,
      equipmentRetiredAt: equipment.retiredAt,
      siteId: equipment.siteId,
      siteRetiredAt: sites.retiredAt,
    })
    .from(points)
    .innerJoin(equipment, eq(equipment.id, points.equipmentId))
    .innerJoin(sites, eq(sites.id, equipment.siteId))
    .where(and(eq(points.id, pointId), siteScope(viewer)))
    .get();
}

function mappedBy(db: Pick<Db, "select">, pointId: number) {
  return db
    .select({ gatewayId: gatewayPointMaps.gatewayId, gatewayPoint: gatewayPointMaps.gatewayPoint })
    .from(gatewayPointMaps)
    .where(eq(gatewayPointMaps.pointId, pointId))
    .orderBy(asc(gatewayPointMaps.gatewayId), asc(gatewayPointMaps.gatewayPoint))
    .all();
}

export function getPoint(db: Db, viewer: Viewer, pointId: number): PointDetailDto | null {
  const row = pointRow(db, viewer, pointId);
  if (!row) return null;
  const { equipmentRetiredAt: _e, siteRetiredAt: _s, ...rest } = row;
  const q = quantities[row.quantity as QuantityKey];
  return {
    ...rest,
    label: q?.label ?? row.quantity,
    measure: q?.measure ?? "text",
    mappedBy: mappedBy(db, pointId),
  };
}

const valuesOf = (p: {
  unit: string;
  expectedIntervalS: number;
  lowLimit: number | null;
  highLimit: number | null;
}): PointValues => ({
  unit: p.unit,
  expectedIntervalS: p.expectedIntervalS,
  lowLimit: p.lowLimit,
  highLimit: p.highLimit,
});

export interface NewPointValues {
  quantity: QuantityKey;
  expectedIntervalS: number;
  lowLimit: number | null;
  highLimit: number | null;
}

/** Adds one point (its key is its quantity, unique within the equipment); 409 when it exists. */
export function insertPoint(db: Db, viewer: Viewer, equipmentId: string, input: NewPointValues): PointDetailDto {
  const e = visibleEquipment(db, viewer, equipmentId);
  if (!e) throw notFound("No such equipment.");
  requireAdmin(viewer);
  requireActive(e);
  if (!quantityFitsKind(e.kind as EquipmentKind, input.quantity))
    throw new AppError("bad_request", "The request is not valid.", [
      { path: "quantity", message: `a ${e.kind} has no ${input.quantity} point (lib/quantities.ts pointsByKind)` },
    ]);
  const id = db.transaction(
    (tx) => {
      const clash = tx
        .select({ id: points.id })
        .from(points)
        .where(and(eq(points.equipmentId, equipmentId), eq(points.key, input.quantity)))
        .get();
      if (clash) throw new AppError("conflict", `${e.tag} already has a ${input.quantity} point.`);
      const values = {
        unit: canonicalUnitOf(input.quantity),
        expectedIntervalS: input.expectedIntervalS,
        lowLimit: input.lowLimit,
        highLimit: input.highLimit,
      };
      const inserted = tx
        .insert(points)
        .values({
          equipmentId,
          key: input.quantity,
          quantity: input.quantity,
          brickClass: quantities[input.quantity].brickClass,
          ...values,
        })
        .returning({ id: points.id })
        .get();
      writeAudit(tx, viewer, {
        action: "create",
        entityType: "point",
        entityId: String(inserted.id),
        siteId: e.siteId,
        summary: `Added point ${e.tag} ${input.quantity}`,
        after: { equipmentTag: e.tag, quantity: input.quantity, ...values },
      });
      return inserted.id;
    },
    { behavior: "immediate" },
  );
  return getPoint(db, viewer, id)!;
}

export interface PointChange {
  expectedIntervalS?: number;
  lowLimit: number | null;
  highLimit: number | null;
}

/**
 * Changes a point's expected interval and limits. Returns the point and the gateways that map
 * it (their ingest view holds the interval, so the caller tells the running server).
 */
export function updatePoint(
  db: Db,
  viewer: Viewer,
  pointId: number,
  change: PointChange,
): { point: PointDetailDto; gatewayIds: string[] } {
  const row = pointRow(db, viewer, pointId);
  if (!row) throw notFound("No such point.");
  requireAdmin(viewer);
  requireActive({
    id: row.equipmentId,
    siteId: row.siteId,
    tag: row.equipmentTag,
    kind: row.equipmentKind,
    retired: row.equipmentRetiredAt !== null,
    siteRetired: row.siteRetiredAt !== null,
  });
  const before = valuesOf(row);
  const after: PointValues = {
    unit: canonicalUnitOf(row.quantity as QuantityKey),
    expectedIntervalS: change.expectedIntervalS ?? row.expectedIntervalS,
    lowLimit: change.lowLimit,
    highLimit: change.highLimit,
  };
  db.transaction(
    (tx) => {
      tx.update(points).set(after).where(eq(points.id, pointId)).run();
      writeAudit(tx, viewer, {
        action: "update",
        entityType: "point",
        entityId: String(pointId),
        siteId: row.siteId,
        summary: `Changed point ${row.equipmentTag} ${row.quantity}`,
        before,
        after,
      });
    },
    { behavior: "immediate" },
  );
  const point = getPoint(db, viewer, pointId)!;
  return { point, gatewayIds: [...new Set(point.mappedBy.map((m) => m.gatewayId))] };
}

/**
 * Removes a point. Refused (409) while a gateway point map feeds it: the map is the gateway's
 * contract and must be changed first, or readings would silently become "unmapped". A point
 * with stored readings is removed only with `discardHistory`, since its readings go with it.
 */
export function deletePoint(db: Db, viewer: Viewer, pointId: number, opts: { discardHistory: boolean }): void {
  const row = pointRow(db, viewer, pointId);
  if (!row) throw notFound("No such point.");
  requireAdmin(viewer);
  db.transaction(
    (tx) => {
      const maps = mappedBy(tx, pointId);
      if (maps.length > 0) {
        const names = maps.map((m) => `${m.gatewayId}: ${m.gatewayPoint}`).join(", ");
        throw new AppError(
          "conflict",
          `A gateway point map feeds this point (${names}); remove it from the point map first.`,
          { mappedBy: maps },
        );
      }
      const stored =
        tx
          .select({ n: sql<number>`count(*)` })
          .from(readings)
          .where(eq(readings.pointId, pointId))
          .get()?.n ?? 0;
      if (stored > 0 && !opts.discardHistory)
        throw new AppError(
          "conflict",
          `This point has ${stored} stored reading(s), which would be deleted with it; repeat with discardHistory=1 to remove both.`,
          { readings: stored },
        );
      tx.delete(points).where(eq(points.id, pointId)).run();
      writeAudit(tx, viewer, {
        action: "delete",
        entityType: "point",
        entityId: String(pointId),
        siteId: row.siteId,
        summary: `Removed point ${row.equipmentTag} ${row.quantity}${stored ? ` and its ${stored} reading(s)` : ""}`,
        before: { equipmentTag: row.equipmentTag, quantity: row.quantity, ...valuesOf(row) },
      });
    },
    { behavior: "immediate" },
  );
}

/** The site's points as a point list (every equipment, retired excluded), for the CSV export and the page. */
export function sitePointList(db: Db, viewer: Viewer, siteId: string) {
  if (
    !db
      .select({ id: sites.id })
      .from(sites)
      .where(and(eq(sites.id, siteId), siteScope(viewer)))
      .get()
  )
    throw notFound("No such site.");
  return db
    .select({
      equipmentTag: equipment.tag,
      equipmentKind: equipment.kind,
      quantity: points.quantity,
      unit: points.unit,
      expectedIntervalS: points.expectedIntervalS,
      lowLimit: points.lowLimit,
      highLimit: points.highLimit,
    })
    .from(points)
    .innerJoin(equipment, eq(equipment.id, points.equipmentId))
    .where(and(eq(equipment.siteId, siteId), sql`${equipment.retiredAt} is null`))
    .orderBy(asc(equipment.tag), asc(points.id))
    .all();
}

export interface PointListImport {
  applied: boolean;
  plan: PointListPlan;
  errors: PointListError[];
  /** Gateways mapping a point whose interval changed (their ingest view must be reloaded). */
  gatewayIds: string[];
}

/**
 * Plans a parsed point list against the site's equipment and points and, with `apply`, carries
 * it out: every row or none, in one transaction that also reads the state it plans against, so
 * a change in between cannot slip through. One audit entry per created or changed point.
 */
export function importPointList(
  db: Db,
  viewer: Viewer,
  siteId: string,
  rows: readonly PointListRow[],
  opts: { apply: boolean },
): PointListImport {
  const site = db
    .select({ id: sites.id, retiredAt: sites.retiredAt })
    .from(sites)
    .where(and(eq(sites.id, siteId), siteScope(viewer)))
    .get();
  if (!site) throw notFound("No such site.");
  requireAdmin(viewer);
  if (site.retiredAt) throw new AppError("conflict", "This site is retired; its points cannot be changed.");
  return db.transaction(
    (tx) => {
      const siteEquipment = tx
        .select({ id: equipment.id, tag: equipment.tag, kind: equipment.kind, retiredAt: equipment.retiredAt })
        .from(equipment)
        .where(eq(equipment.siteId, siteId))
        .all()
        .map(({ retiredAt, ...e }) => ({ ...e, retired: retiredAt !== null }));
      const ids = siteEquipment.map((e) => e.id);
      const existing = ids.length
        ? tx
            .select({ ...pointColumns, equipmentId: points.equipmentId })
            .from(points)
            .where(inArray(points.equipmentId, ids))
            .all()
        : [];
      const { plan, errors } = planPointList(rows, siteEquipment, existing);
      if (errors.length > 0 || !opts.apply) return { applied: false, plan, errors, gatewayIds: [] };
      const intervalChanged: number[] = [];
      const audits: AuditEntry[] = [];
      const audit = (item: PlannedPoint, id: number) =>
        audits.push({
          action: item.action,
          entityType: "point",
          entityId: String(id),
          siteId,
          summary: `${item.action === "create" ? "Added" : "Changed"} point ${item.equipmentTag} ${item.quantity} (point list, line ${item.line})`,
          before: item.before,
          after: { equipmentTag: item.equipmentTag, quantity: item.quantity, ...item.after },
        });
      // Prepared once: a point list can hold thousands of rows, and building each statement
      // anew costs more than SQLite's write of it.
      const p = (name: string) => sql.placeholder(name);
      const insert = tx
        .insert(points)
        .values({
          equipmentId: p("equipmentId"),
          key: p("quantity"),
          quantity: p("quantity"),
          brickClass: p("brickClass"),
          unit: p("unit"),
          expectedIntervalS: p("expectedIntervalS"),
          lowLimit: p("lowLimit"),
          highLimit: p("highLimit"),
        })
        .prepare();
      const update = tx
        .update(points)
        .set({
          unit: sql`${p("unit")}`,
          expectedIntervalS: sql`${p("expectedIntervalS")}`,
          lowLimit: sql`${p("lowLimit")}`,
          highLimit: sql`${p("highLimit")}`,
        })
        .where(eq(points.id, p("id")))
        .prepare();
      for (const item of plan.items) {
        if (item.action === "create") {
          const { lastInsertRowid } = insert.run({
            equipmentId: item.equipmentId,
            quantity: item.quantity,
            brickClass: quantities[item.quantity].brickClass,
            ...item.after,
          });
          audit(item, Number(lastInsertRowid));
        } else if (item.action === "update") {
          update.run({ id: item.pointId!, ...item.after });
          if (item.before!.expectedIntervalS !== item.after.expectedIntervalS) intervalChanged.push(item.pointId!);
          audit(item, item.pointId!);
        }
      }
      writeAudits(tx, viewer, audits);
      const gatewayIds = intervalChanged.length
        ? [
            ...new Set(
              tx
                .select({ id: gatewayPointMaps.gatewayId })
                .from(gatewayPointMaps)
                .where(inArray(gatewayPointMaps.pointId, intervalChanged))
                .all()
                .map((r) => r.id),
            ),
          ]
        : [];
      return { applied: true, plan, errors: [], gatewayIds };
    },
    { behavior: "immediate" },
  );
}

/** The site with its equipment (retired left out) and their points, as the open-format exports take it. */
export function siteModel(db: Db, viewer: Viewer, siteId: string): SiteModel {
  const site = db
    .select({ id: sites.id, name: sites.name, kind: sites.kind, address: sites.address, timeZone: sites.timeZone })
    .from(sites)
    .where(and(eq(sites.id, siteId), siteScope(viewer)))
    .get();
  if (!site) throw notFound("No such site.");
  const equipmentRows = db
    .select({
      id: equipment.id,
      tag: equipment.tag,
      name: equipment.name,
      kind: equipment.kind,
      serves: equipment.serves,
      refrigerant: equipment.refrigerant,
      record: equipment.record,
    })
    .from(equipment)
    .where(and(eq(equipment.siteId, siteId), sql`${equipment.retiredAt} is null`))
    .orderBy(asc(equipment.tag))
    .all();
  const ids = equipmentRows.map((e) => e.id);
  const pointRows = ids.length
    ? db
        .select({ ...pointColumns, equipmentId: points.equipmentId })
        .from(points)
        .where(inArray(points.equipmentId, ids))
        .orderBy(asc(points.id))
        .all()
    : [];
  return {
    site,
    equipment: equipmentRows.map((e) => ({ ...e, record: e.record ?? {} })),
    // A quantity no longer in the vocabulary has no class or tags to export.
    points: pointRows.filter((p) => isQuantityKey(p.quantity)) as SiteModel["points"],
  };
}
