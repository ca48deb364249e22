import "server-only";
import { and, asc, eq, isNull } from "drizzle-orm";
import type { Db } from "../client";
import { equipment, equipmentLimits, sites, users, type NewEquipment } from "../schema";
import { isAdmin, type Viewer } from "@/lib/auth/viewer";
import { AppError, notFound } from "@/lib/errors";
import type { ChillerLimitDto, EquipmentRecordDto } from "@/lib/dto/sites";
import {
  asRefrigerant,
  chillerLimitKeys,
  chillerLimitProblems,
  effectiveChillerLimits,
  limitValues,
  type ChillerLimitKey,
  type EffectiveLimit,
} from "@/lib/plant/equipment-limits";
import { equipmentSchema, type EquipmentBody } from "@/lib/schemas/equipment";
import { writeAudit } from "./audit";
import { compressorTypeOf, getSiteRecord, requireAdminToChange, siteScope, type Queryable } from "./sites";

// Equipment records and a chiller's entered limits. Visibility follows the site's (a customer's
// viewer matches only its own organization's sites); only admins change anything.

const columns = {
  id: equipment.id,
  siteId: equipment.siteId,
  kind: equipment.kind,
  tag: equipment.tag,
  name: equipment.name,
  capacityTons: equipment.capacityTons,
  designFlowLps: equipment.designFlowLps,
  refrigerant: equipment.refrigerant,
  serves: equipment.serves,
  record: equipment.record,
  createdAt: equipment.createdAt,
  retiredAt: equipment.retiredAt,
  retiredBy: equipment.retiredBy,
};
type Row = {
  id: string;
  siteId: string;
  kind: string;
  tag: string;
  name: string;
  capacityTons: number | null;
  designFlowLps: number | null;
  refrigerant: string | null;
  serves: string | null;
  record: Record<string, unknown>;
  createdAt: Date;
  retiredAt: Date | null;
  retiredBy: string | null;
};

/** The kind's fields as the form takes them: the columns the plant code reads, then the rest of the record. */
function formRecord(r: Row): Record<string, unknown> {
  const out: Record<string, unknown> = { ...r.record };
  if (r.kind === "chiller") {
    out.capacityTons = r.capacityTons;
    out.refrigerant = r.refrigerant;
    out.chwDesignFlowLps = r.designFlowLps;
  } else if (r.kind === "cooling_tower") out.capacityTons = r.capacityTons;
  else if (r.kind === "pump") out.designFlowLps = r.designFlowLps;
  return out;
}

/** Fields kept in columns that existing plant code reads, by kind; the rest of the body goes in `record`. */
const columnFields: Record<string, Record<string, "capacityTons" | "designFlowLps" | "refrigerant">> = {
  chiller: { capacityTons: "capacityTons", refrigerant: "refrigerant", chwDesignFlowLps: "designFlowLps" },
  cooling_tower: { capacityTons: "capacityTons" },
  pump: { designFlowLps: "designFlowLps" },
};

/** Splits a validated body into the columns existing code reads and the rest of the kind's record. */
function toColumns(body: EquipmentBody): Omit<NewEquipment, "id" | "siteId"> {
  const { kind, tag, name, serves, ...rest } = body;
  const out: Omit<NewEquipment, "id" | "siteId"> = {
    kind,
    tag,
    name,
    serves: serves ?? null,
    capacityTons: null,
    designFlowLps: null,
    refrigerant: null,
    record: {},
  };
  const record: Record<string, unknown> = {};
  for (const [field, value] of Object.entries(rest)) {
    if (value === undefined || value === null) continue;
    const column = columnFields[kind]?.[field];
    if (column) (out as Record<string, unknown>)[column] = value;
    else record[field] = value;
  }
  return { ...out, record };
}

function enteredLimits(db: Queryable, equipmentId: string) {
  return db
    .select({
      key: equipmentLimits.key,
      value: equipmentLimits.value,
      setBy: equipmentLimits.setBy,
      setByName: users.name,
      setAt: equipmentLimits.setAt,
    })
    .from(equipmentLimits)
    .leftJoin(users, eq(users.id, equipmentLimits.setBy))
    .where(eq(equipmentLimits.equipmentId, equipmentId))
    .all()
    .map((l) => ({ ...l, key: l.key as ChillerLimitKey, setAtMs: l.setAt.getTime() }));
}

function effectiveLimitsOf(db: Queryable, r: Row): Record<ChillerLimitKey, EffectiveLimit> {
  return effectiveChillerLimits(asRefrigerant(r.refrigerant), compressorTypeOf(r.record), enteredLimits(db, r.id));
}

function toDto(db: Queryable, r: Row): EquipmentRecordDto {
  return {
    id: r.id,
    siteId: r.siteId,
    kind: r.kind,
    tag: r.tag,
    name: r.name,
    serves: r.serves,
    record: formRecord(r),
    createdAtMs: r.createdAt.getTime(),
    retiredAtMs: r.retiredAt?.getTime() ?? null,
    retiredBy: r.retiredBy,
    limits: r.kind === "chiller" ? (effectiveLimitsOf(db, r) as Record<string, ChillerLimitDto>) : null,
  };
}

function visibleRow(db: Queryable, viewer: Viewer, equipmentId: string): Row | null {
  const row = db
    .select(columns)
    .from(equipment)
    .innerJoin(sites, eq(sites.id, equipment.siteId))
    .where(and(eq(equipment.id, equipmentId), siteScope(viewer)))
    .get();
  // Retired equipment is an admin's business only.
  if (!row || (row.retiredAt && !isAdmin(viewer))) return null;
  return row;
}

/** A site's equipment (404 for a site the viewer may not see); retired rows only for admins who ask. */
export function listEquipment(
  db: Db,
  viewer: Viewer,
  siteId: string,
  opts: { includeRetired?: boolean } = {},
): EquipmentRecordDto[] {
  if (!getSiteRecord(db, viewer, siteId)) throw notFound("No such site.");
  return db
    .select(columns)
    .from(equipment)
    .where(
      and(
        eq(equipment.siteId, siteId),
        opts.includeRetired && isAdmin(viewer) ? undefined : isNull(equipment.retiredAt),
      ),
    )
    .orderBy(asc(equipment.tag))
    .all()
    .map((r) => toDto(db, r));
}

export function getEquipment(db: Queryable, viewer: Viewer, equipmentId: string): EquipmentRecordDto | null {
  const row = visibleRow(db, viewer, equipmentId);
  return row ? toDto(db, row) : null;
}

const audited = (e: EquipmentRecordDto) => ({
  kind: e.kind,
  tag: e.tag,
  name: e.name,
  serves: e.serves,
  record: e.record,
  retiredAtMs: e.retiredAtMs,
});

const fieldError = (path: string, message: string, code: "bad_request" | "conflict" = "bad_request") =>
  new AppError(code, code === "conflict" ? message : "The request is not valid.", [{ path, message }]);

/** Tags are unique within a site (retired equipment keeps its tag), and `serves` names a chiller in service there. */
function checkPlace(tx: Queryable, siteId: string, body: EquipmentBody, selfId?: string): void {
  const clash = tx
    .select({ id: equipment.id, retiredAt: equipment.retiredAt })
    .from(equipment)
    .where(and(eq(equipment.siteId, siteId), eq(equipment.tag, body.tag)))
    .all()
    .find((e) => e.id !== selfId);
  if (clash)
    throw fieldError(
      "tag",
      clash.retiredAt
        ? "Retired equipment at this site has this tag; restore it or choose another tag"
        : "Another piece of equipment at this site has this tag",
      "conflict",
    );
  if ((body.kind === "pump" || body.kind === "cooling_tower") && body.serves) {
    const served = tx
      .select({ kind: equipment.kind, retiredAt: equipment.retiredAt })
      .from(equipment)
      .where(and(eq(equipment.siteId, siteId), eq(equipment.tag, body.serves)))
      .get();
    if (!served || served.retiredAt || served.kind !== "chiller")
      throw fieldError("serves", `No chiller ${body.serves} in service at this site`);
  }
}

function newEquipmentId(siteId: string, tag: string): string {
  // The seed's form (site:tag), unique while tags are unique within a site.
  return `${siteId}:${tag.toUpperCase()}`;
}

/** Adds equipment to a site in service. */
export function insertEquipment(db: Db, viewer: Viewer, siteId: string, input: unknown): EquipmentRecordDto {
  const site = getSiteRecord(db, viewer, siteId);
  if (!site) throw notFound("No such site.");
  requireAdminToChange(viewer);
  if (site.retiredAtMs !== null) throw new AppError("conflict", "This site is retired; restore it first.");
  const body = equipmentSchema.parse(input);
  return db.transaction(
    (tx) => {
      checkPlace(tx, siteId, body);
      let id = newEquipmentId(siteId, body.tag);
      if (tx.select({ id: equipment.id }).from(equipment).where(eq(equipment.id, id)).get())
        id = `${id}-${Date.now().toString(36)}`;
      tx.insert(equipment)
        .values({ id, siteId, ...toColumns(body) })
        .run();
      const created = getEquipment(tx, viewer, id)!;
      writeAudit(tx, viewer, {
        action: "create",
        entityType: "equipment",
        entityId: id,
        siteId,
        summary: `Added ${body.kind.replace("_", " ")} ${body.tag} at ${site.name}`,
        after: audited(created),
      });
      return created;
    },
    { behavior: "immediate" },
  );
}

/** Edits: the given fields over the stored record, validated whole. The kind does not change. */
export function updateEquipment(
  db: Db,
  viewer: Viewer,
  equipmentId: string,
  patch: Record<string, unknown>,
): EquipmentRecordDto {
  return db.transaction(
    (tx) => {
      const row = visibleRow(tx, viewer, equipmentId);
      if (!row) throw notFound("No such equipment.");
      requireAdminToChange(viewer);
      if (row.retiredAt) throw new AppError("conflict", "This equipment is retired; restore it first.");
      const before = toDto(tx, row);
      const merged: Record<string, unknown> = {
        kind: row.kind,
        tag: row.tag,
        name: row.name,
        serves: row.serves,
        ...before.record,
        ...patch,
      };
      // A capacity given in kW replaces the stored tons.
      if (patch.capacityKW !== undefined && patch.capacityTons === undefined) delete merged.capacityTons;
      // Stored nulls of optional fields are absent in the form, so they validate as "not given".
      const cleaned = Object.fromEntries(Object.entries(merged).filter(([k, v]) => v !== null || k === "serves"));
      if ("kind" in patch && patch.kind !== row.kind)
        throw fieldError("kind", "The kind of a piece of equipment cannot change; retire it and add a new one");
      const body = equipmentSchema.parse(cleaned);
      checkPlace(tx, row.siteId, body, row.id);
      if (body.tag !== row.tag) {
        const dependants = tx
          .select({ tag: equipment.tag })
          .from(equipment)
          .where(and(eq(equipment.siteId, row.siteId), eq(equipment.serves, row.tag), isNull(equipment.retiredAt)))
          .all();
        if (dependants.length)
          throw fieldError(
            "tag",
            `${dependants.map((d) => d.tag).join(", ")} serve ${row.tag}; change what they serve first`,
            "conflict",
          );
      }
      tx.update(equipment).set(toColumns(body)).where(eq(equipment.id, row.id)).run();
      const after = getEquipment(tx, viewer, row.id)!;
      writeAudit(tx, viewer, {
        action: "update",
        entityType: "equipment",
        entityId: row.id,
        siteId: row.siteId,
        summary: `Edited ${after.tag}`,
        before: audited(before),
        after: audited(after),
      });
      return after;
    },
    { behavior: "immediate" },
  );
}

/** Retires (or restores) one piece of equipment; its points and history stay. Null when already so. */
export function setEquipmentRetired(
  db: Db,
  viewer: Viewer,
  equipmentId: string,
  retired: boolean,
): EquipmentRecordDto | null {
  return db.transaction(
    (tx) => {
      const row = visibleRow(tx, viewer, equipmentId);
      if (!row) throw notFound("No such equipment.");
      requireAdminToChange(viewer);
      if ((row.retiredAt !== null) === retired) return null;
      if (!retired) {
        const clash = tx
          .select({ id: equipment.id })
          .from(equipment)
          .where(and(eq(equipment.siteId, row.siteId), eq(equipment.tag, row.tag), isNull(equipment.retiredAt)))
          .get();
        if (clash) throw fieldError("tag", "Equipment in service at this site has this tag", "conflict");
      }
      const before = toDto(tx, row);
      tx.update(equipment)
        .set(retired ? { retiredAt: new Date(), retiredBy: viewer.userId } : { retiredAt: null, retiredBy: null })
        .where(eq(equipment.id, row.id))
        .run();
      const after = getEquipment(tx, viewer, row.id)!;
      writeAudit(tx, viewer, {
        action: retired ? "retire" : "restore",
        entityType: "equipment",
        entityId: row.id,
        siteId: row.siteId,
        summary: `${retired ? "Retired" : "Restored"} ${row.tag}`,
        before: audited(before),
        after: audited(after),
      });
      return after;
    },
    { behavior: "immediate" },
  );
}

/**
 * Enters (number) or clears (null: back to the default) a chiller's limits. The values after the
 * change are checked together (chillerLimitProblems); each key that changed is audited from → to.
 */
export function setChillerLimits(
  db: Db,
  viewer: Viewer,
  equipmentId: string,
  values: Partial<Record<ChillerLimitKey, number | null | undefined>>,
  atMs = Date.now(),
): { equipment: EquipmentRecordDto; changed: ChillerLimitKey[] } {
  return db.transaction(
    (tx) => {
      const row = visibleRow(tx, viewer, equipmentId);
      if (!row) throw notFound("No such equipment.");
      requireAdminToChange(viewer);
      if (row.kind !== "chiller") throw new AppError("bad_request", "Only chillers have limits.");
      if (row.retiredAt) throw new AppError("conflict", "This equipment is retired; restore it first.");
      const before = effectiveLimitsOf(tx, row);
      const entered = enteredLimits(tx, row.id);
      const next = entered.filter((e) => values[e.key] === undefined);
      for (const key of chillerLimitKeys) {
        const v = values[key];
        if (typeof v === "number")
          next.push({
            key,
            value: v,
            setBy: viewer.userId,
            setByName: viewer.name,
            setAt: new Date(atMs),
            setAtMs: atMs,
          });
      }
      const after = effectiveChillerLimits(asRefrigerant(row.refrigerant), compressorTypeOf(row.record), next);
      const problems = chillerLimitProblems(limitValues(after));
      if (problems.length)
        throw new AppError(
          "bad_request",
          "The request is not valid.",
          problems.map((p) => ({ path: `values.${p.key}`, message: p.message })),
        );
      const changed: ChillerLimitKey[] = [];
      for (const key of chillerLimitKeys) {
        const v = values[key];
        if (v === undefined) continue;
        const was = before[key];
        if (v === null) {
          if (was.source === "default") continue;
          tx.delete(equipmentLimits)
            .where(and(eq(equipmentLimits.equipmentId, row.id), eq(equipmentLimits.key, key)))
            .run();
        } else {
          if (was.source === "entered" && was.value === v) continue;
          const setBy = viewer.userId === "system" ? null : viewer.userId;
          tx.insert(equipmentLimits)
            .values({ equipmentId: row.id, key, value: v, setBy, setAt: new Date(atMs) })
            .onConflictDoUpdate({
              target: [equipmentLimits.equipmentId, equipmentLimits.key],
              set: { value: v, setBy, setAt: new Date(atMs) },
            })
            .run();
        }
        changed.push(key);
        const now = after[key];
        writeAudit(
          tx,
          viewer,
          {
            action: v === null ? "clear" : "set",
            entityType: "limit",
            entityId: `${row.id}/${key}`,
            siteId: row.siteId,
            summary: `${row.tag} ${key}: ${was.value} (${was.source}) → ${now.value} (${now.source})`,
            before: { value: was.value, source: was.source },
            after: { value: now.value, source: now.source },
          },
          atMs,
        );
      }
      return { equipment: getEquipment(tx, viewer, row.id)!, changed };
    },
    { behavior: "immediate" },
  );
}
