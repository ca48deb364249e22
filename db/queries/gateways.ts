import "server-only";
import { randomBytes } from "node:crypto";
import { and, asc, desc, eq, inArray, isNull, max, sql } from "drizzle-orm";
import type { Db } from "../client";
import {
  equipment,
  gatewayPointMaps,
  gatewayRejections,
  gateways,
  gatewayUnmappedPoints,
  points,
  sites,
  type GatewayProtocol,
  type GatewayState,
} from "../schema";
import { writeAudit } from "./audit";
import { canSeeSite, isSiteRetired, siteScope } from "./sites";
import { checkGatewayPassword, hashGatewayPassword, type HashGate } from "@/gateway/credential-hash";
import { canAct, isAdmin, type Viewer } from "@/lib/auth/viewer";
import { AppError, notFound } from "@/lib/errors";
import { quantities, type Measure, type QuantityKey } from "@/lib/quantities";
import type { WireUnitCode } from "@/lib/units";
import type { LineError, PointMapLine } from "@/lib/point-map-csv";
import { isOnline, silenceMs } from "@/lib/freshness";
import type { GatewayCredentials, GatewayDto, PointMapEntryDto } from "@/lib/dto/gateways";

// Gateways as the API sees them (viewer-scoped, DTOs only) and as the ingest side needs them
// (system functions at the bottom, no viewer: the broker has no user). The password hash
// never leaves this module: credentials are checked here, hashed by gateway/credential-hash.ts.

export interface CreateGatewayInput {
  siteId: string;
  name: string;
  protocol: GatewayProtocol;
  groupId?: string;
  edgeNodeId?: string;
}

const iso = (d: Date | null) => (d ? d.toISOString() : null);
const newPassword = () => randomBytes(24).toString("base64url");
const newGatewayId = () => `gw-${randomBytes(6).toString("hex")}`;

function topicsOf(g: { id: string; protocol: GatewayProtocol; groupId: string | null; edgeNodeId: string | null }) {
  if (g.protocol === "json") {
    return {
      publish: [`liftline/${g.id}/readings`, `liftline/${g.id}/status`],
      subscribe: [`liftline/${g.id}/commands`],
    };
  }
  const node = `${g.groupId}/+/${g.edgeNodeId}`;
  return {
    publish: [`spBv1.0/${node}`, `spBv1.0/${node}/+`],
    subscribe: [`spBv1.0/${g.groupId}/NCMD/${g.edgeNodeId}`, `spBv1.0/${g.groupId}/DCMD/${g.edgeNodeId}/+`],
  };
}

type GatewayRow = typeof gateways.$inferSelect;

/** The slowest expected interval among a gateway's mapped points (for its silence timeout). */
function maxIntervals(db: Db, ids: string[]): Map<string, number> {
  if (ids.length === 0) return new Map();
  return new Map(
    db
      .select({ id: gatewayPointMaps.gatewayId, s: max(points.expectedIntervalS) })
      .from(gatewayPointMaps)
      .innerJoin(points, eq(points.id, gatewayPointMaps.pointId))
      .where(inArray(gatewayPointMaps.gatewayId, ids))
      .groupBy(gatewayPointMaps.gatewayId)
      .all()
      .map((r) => [r.id, r.s ?? 0]),
  );
}

function toDtos(db: Db, rows: GatewayRow[], nowMs = Date.now()): GatewayDto[] {
  if (rows.length === 0) return [];
  const ids = rows.map((r) => r.id);
  const rejected = new Map<string, Record<string, number>>();
  for (const r of db.select().from(gatewayRejections).where(inArray(gatewayRejections.gatewayId, ids)).all()) {
    const m = rejected.get(r.gatewayId) ?? {};
    m[r.reason] = r.count;
    rejected.set(r.gatewayId, m);
  }
  const unmapped = new Map<string, GatewayDto["unmapped"]>();
  for (const r of db
    .select()
    .from(gatewayUnmappedPoints)
    .where(inArray(gatewayUnmappedPoints.gatewayId, ids))
    .orderBy(desc(gatewayUnmappedPoints.count), asc(gatewayUnmappedPoints.pointName))
    .all()) {
    const list = unmapped.get(r.gatewayId) ?? [];
    if (list.length < 200) list.push({ point: r.pointName, count: r.count, lastSeenAt: r.lastSeenAt.toISOString() });
    unmapped.set(r.gatewayId, list);
  }
  const mapSizes = new Map(
    db
      .select({ id: gatewayPointMaps.gatewayId, n: sql<number>`count(*)` })
      .from(gatewayPointMaps)
      .where(inArray(gatewayPointMaps.gatewayId, ids))
      .groupBy(gatewayPointMaps.gatewayId)
      .all()
      .map((r) => [r.id, r.n]),
  );
  const intervals = maxIntervals(db, ids);
  return rows.map((g) => {
    const rej = rejected.get(g.id) ?? {};
    return {
      id: g.id,
      siteId: g.siteId,
      name: g.name,
      protocol: g.protocol,
      groupId: g.groupId,
      edgeNodeId: g.edgeNodeId,
      username: g.username,
      createdAt: g.createdAt.toISOString(),
      passwordRotatedAt: iso(g.passwordRotatedAt),
      revokedAt: iso(g.revokedAt),
      topics: topicsOf(g),
      status: {
        state: g.state,
        stateChangedAt: iso(g.stateChangedAt),
        online: isOnline(
          {
            state: g.state,
            stateChangedAtMs: g.stateChangedAt?.getTime() ?? null,
            lastMessageAtMs: g.lastMessageAt?.getTime() ?? null,
            revoked: g.revokedAt !== null,
            silenceMs: silenceMs(intervals.get(g.id)),
          },
          nowMs,
        ),
        lastMessageAt: iso(g.lastMessageAt),
      },
      counters: {
        messages: g.messages,
        readingsAccepted: g.readingsAccepted,
        readingsDuplicate: g.readingsDuplicate,
        rejected: rej,
        rejectedTotal: Object.values(rej).reduce((a, b) => a + b, 0),
      },
      unmapped: unmapped.get(g.id) ?? [],
      pointMapSize: mapSizes.get(g.id) ?? 0,
    };
  });
}

/** The gateway row when the viewer may see its site; null (→ 404) otherwise. */
function visibleGateway(db: Db, viewer: Viewer, id: string): GatewayRow | null {
  const row = db.select().from(gateways).where(eq(gateways.id, id)).get();
  if (!row || !canSeeSite(db, viewer, row.siteId)) return null;
  return row;
}

function requireAdmin(viewer: Viewer) {
  if (!isAdmin(viewer)) throw new AppError("forbidden", "Only an administrator can manage gateways.");
}

export function listGateways(db: Db, viewer: Viewer, siteId?: string): GatewayDto[] {
  if (siteId !== undefined && !canSeeSite(db, viewer, siteId)) throw notFound("No such site.");
  const rows = db
    .select({ g: gateways })
    .from(gateways)
    .innerJoin(sites, eq(sites.id, gateways.siteId))
    .where(and(siteId ? eq(gateways.siteId, siteId) : undefined, siteScope(viewer)))
    .orderBy(asc(gateways.siteId), asc(gateways.name))
    .all()
    .map((r) => r.g);
  return toDtos(db, rows);
}

export function getGateway(db: Db, viewer: Viewer, id: string): GatewayDto | null {
  const row = visibleGateway(db, viewer, id);
  return row ? toDtos(db, [row])[0] : null;
}

/** What the audit keeps of a gateway: never its password hash. */
function audited(row: typeof gateways.$inferSelect) {
  return {
    name: row.name,
    siteId: row.siteId,
    protocol: row.protocol,
    groupId: row.groupId,
    edgeNodeId: row.edgeNodeId,
    passwordRotatedAt: row.passwordRotatedAt?.toISOString() ?? null,
    revokedAt: row.revokedAt?.toISOString() ?? null,
  };
}

export async function createGateway(db: Db, viewer: Viewer, input: CreateGatewayInput): Promise<GatewayCredentials> {
  if (!canSeeSite(db, viewer, input.siteId)) throw notFound("No such site.");
  requireAdmin(viewer);
  if (isSiteRetired(db, input.siteId)) throw new AppError("conflict", "This site is retired; restore it first.");
  const id = newGatewayId();
  const password = newPassword();
  const passwordHash = await hashGatewayPassword(password);
  const sparkplug = input.protocol === "sparkplug";
  const groupId = sparkplug ? (input.groupId ?? input.siteId) : null;
  const edgeNodeId = sparkplug ? (input.edgeNodeId ?? id) : null;
  if (sparkplug) {
    const clash = db
      .select({ id: gateways.id })
      .from(gateways)
      .where(and(eq(gateways.groupId, groupId!), eq(gateways.edgeNodeId, edgeNodeId!)))
      .get();
    if (clash) throw new AppError("conflict", "Another gateway already uses this Sparkplug group and edge node id.");
  }
  const row = db.transaction(
    (tx) => {
      tx.insert(gateways)
        .values({
          id,
          siteId: input.siteId,
          name: input.name,
          protocol: input.protocol,
          groupId,
          edgeNodeId,
          username: id,
          passwordHash,
        })
        .run();
      const row = tx.select().from(gateways).where(eq(gateways.id, id)).get()!;
      writeAudit(tx, viewer, {
        action: "provision",
        entityType: "gateway",
        entityId: id,
        siteId: row.siteId,
        summary: `Gateway "${row.name}" provisioned (${row.protocol})`,
        before: null,
        after: audited(row),
      });
      return row;
    },
    { behavior: "immediate" },
  );
  return { gateway: toDtos(db, [row])[0], username: id, password };
}

export async function rotateGatewayPassword(db: Db, viewer: Viewer, id: string): Promise<GatewayCredentials> {
  const row = visibleGateway(db, viewer, id);
  if (!row) throw notFound("No such gateway.");
  requireAdmin(viewer);
  if (row.revokedAt) throw new AppError("conflict", "This gateway is revoked; provision a new one.");
  const password = newPassword();
  const passwordHash = await hashGatewayPassword(password);
  const updated = db.transaction(
    (tx) => {
      tx.update(gateways).set({ passwordHash, passwordRotatedAt: new Date() }).where(eq(gateways.id, id)).run();
      const updated = tx.select().from(gateways).where(eq(gateways.id, id)).get()!;
      writeAudit(tx, viewer, {
        action: "rotate_credentials",
        entityType: "gateway",
        entityId: id,
        siteId: updated.siteId,
        summary: `Gateway "${updated.name}": new password; the old one stopped working`,
        before: audited(row),
        after: audited(updated),
      });
      return updated;
    },
    { behavior: "immediate" },
  );
  return { gateway: toDtos(db, [updated])[0], username: updated.username, password };
}

export function revokeGateway(db: Db, viewer: Viewer, id: string): GatewayDto {
  const row = visibleGateway(db, viewer, id);
  if (!row) throw notFound("No such gateway.");
  requireAdmin(viewer);
  if (!row.revokedAt) {
    db.transaction(
      (tx) => {
        tx.update(gateways)
          .set({ revokedAt: new Date(), state: "offline", stateChangedAt: new Date() })
          .where(eq(gateways.id, id))
          .run();
        writeAudit(tx, viewer, {
          action: "retire",
          entityType: "gateway",
          entityId: id,
          siteId: row.siteId,
          summary: `Gateway "${row.name}" retired; its credentials are revoked`,
          before: audited(row),
          after: audited(tx.select().from(gateways).where(eq(gateways.id, id)).get()!),
        });
      },
      { behavior: "immediate" },
    );
  }
  return toDtos(db, [db.select().from(gateways).where(eq(gateways.id, id)).get()!])[0];
}

export function getPointMap(db: Db, viewer: Viewer, id: string): PointMapEntryDto[] {
  if (!visibleGateway(db, viewer, id)) throw notFound("No such gateway.");
  return db
    .select({
      gatewayPoint: gatewayPointMaps.gatewayPoint,
      pointId: points.id,
      equipmentTag: equipment.tag,
      quantity: points.quantity,
      unit: gatewayPointMaps.unit,
    })
    .from(gatewayPointMaps)
    .innerJoin(points, eq(points.id, gatewayPointMaps.pointId))
    .innerJoin(equipment, eq(equipment.id, points.equipmentId))
    .where(eq(gatewayPointMaps.gatewayId, id))
    .orderBy(asc(gatewayPointMaps.gatewayPoint))
    .all();
}

/**
 * Replaces a gateway's whole point map, or changes nothing: any row error (including rows
 * naming equipment or points the site does not have) leaves the old map in place.
 */
export function replacePointMap(
  db: Db,
  viewer: Viewer,
  id: string,
  rows: PointMapLine[],
  parseErrors: LineError[],
): { accepted: number; errors: LineError[] } {
  const gw = visibleGateway(db, viewer, id);
  if (!gw) throw notFound("No such gateway.");
  if (!canAct(viewer)) throw new AppError("forbidden", "Only service staff can change a point map.");
  if (gw.revokedAt) throw new AppError("conflict", "This gateway is revoked.");
  const sitePoints = new Map(
    db
      .select({ id: points.id, tag: equipment.tag, key: points.key })
      .from(points)
      .innerJoin(equipment, eq(equipment.id, points.equipmentId))
      .where(eq(equipment.siteId, gw.siteId))
      .all()
      .map((p) => [`${p.tag}\u0000${p.key}`, p.id]),
  );
  const tags = new Set([...sitePoints.keys()].map((k) => k.split("\u0000")[0]));
  const errors = [...parseErrors];
  const resolved: Array<{ gatewayPoint: string; pointId: number; unit: WireUnitCode }> = [];
  const targets = new Map<number, number>();
  for (const r of rows) {
    const pointId = sitePoints.get(`${r.equipment}\u0000${r.quantity}`);
    if (!tags.has(r.equipment)) {
      errors.push({ line: r.line, message: `equipment "${r.equipment}" is not at this site` });
    } else if (pointId === undefined) {
      errors.push({ line: r.line, message: `${r.equipment} has no ${r.quantity} point` });
    } else if (targets.has(pointId)) {
      errors.push({
        line: r.line,
        message: `${r.equipment} ${r.quantity} is already fed by line ${targets.get(pointId)}`,
      });
    } else {
      targets.set(pointId, r.line);
      resolved.push({ gatewayPoint: r.gateway_point, pointId, unit: r.unit });
    }
  }
  errors.sort((a, b) => a.line - b.line);
  if (errors.length > 0) return { accepted: 0, errors };
  db.transaction(
    (tx) => {
      const before = tx
        .select({
          gatewayPoint: gatewayPointMaps.gatewayPoint,
          pointId: gatewayPointMaps.pointId,
          unit: gatewayPointMaps.unit,
        })
        .from(gatewayPointMaps)
        .where(eq(gatewayPointMaps.gatewayId, id))
        .orderBy(asc(gatewayPointMaps.gatewayPoint))
        .all();
      writeAudit(tx, viewer, {
        action: "replace_point_map",
        entityType: "gateway",
        entityId: id,
        siteId: gw.siteId,
        summary: `Gateway "${gw.name}": point map replaced (${before.length} → ${resolved.length} rows)`,
        before: { pointMap: before },
        after: { pointMap: [...resolved].sort((a, b) => a.gatewayPoint.localeCompare(b.gatewayPoint)) },
      });
      tx.delete(gatewayPointMaps).where(eq(gatewayPointMaps.gatewayId, id)).run();
      for (let i = 0; i < resolved.length; i += 500) {
        tx.insert(gatewayPointMaps)
          .values(resolved.slice(i, i + 500).map((r) => ({ gatewayId: id, ...r })))
          .run();
      }
      // Names now mapped are no longer "unmapped".
      tx.delete(gatewayUnmappedPoints).where(eq(gatewayUnmappedPoints.gatewayId, id)).run();
    },
    { behavior: "immediate" },
  );
  return { accepted: resolved.length, errors: [] };
}

// ---- System functions for the broker and ingest (no viewer) ----

// A reconnect storm runs these once per CONNECT on the event loop: prepared once per database,
// not built again by the query builder each time.
const prepared = new WeakMap<Db, ReturnType<typeof prepareSystemStatements>>();

function prepareSystemStatements(db: Db) {
  return {
    credentials: db
      .select({
        id: gateways.id,
        siteId: gateways.siteId,
        protocol: gateways.protocol,
        groupId: gateways.groupId,
        edgeNodeId: gateways.edgeNodeId,
        passwordHash: gateways.passwordHash,
        revokedAt: gateways.revokedAt,
        siteRetiredAt: sites.retiredAt,
      })
      .from(gateways)
      .innerJoin(sites, eq(sites.id, gateways.siteId))
      .where(eq(gateways.username, sql.placeholder("username")))
      .prepare(),
    state: db
      .update(gateways)
      // Raw placeholders: the values are bound as given (the time as epoch ms, as the column stores it).
      .set({ state: sql`${sql.placeholder("state")}`, stateChangedAt: sql`${sql.placeholder("at")}` })
      .where(eq(gateways.id, sql.placeholder("gatewayId")))
      .prepare(),
  };
}

function systemStatements(db: Db) {
  let statements = prepared.get(db);
  if (!statements) prepared.set(db, (statements = prepareSystemStatements(db)));
  return statements;
}

export interface GatewayIdentityRecord {
  gatewayId: string;
  siteId: string;
  protocol: GatewayProtocol;
  groupId: string | null;
  edgeNodeId: string | null;
}

/**
 * MQTT CONNECT: user name and password → the gateway, or why not. With a gate (the connect
 * limiter), "limited" when it refused the attempt before any hash.
 */
export function verifyGatewayCredentials(
  db: Db,
  username: string | undefined,
  password: string | undefined,
): Promise<GatewayIdentityRecord | "bad_credentials" | "revoked">;
export function verifyGatewayCredentials(
  db: Db,
  username: string | undefined,
  password: string | undefined,
  gate: HashGate | undefined,
): Promise<GatewayIdentityRecord | "bad_credentials" | "revoked" | "limited">;
export async function verifyGatewayCredentials(
  db: Db,
  username: string | undefined,
  password: string | undefined,
  gate?: HashGate,
): Promise<GatewayIdentityRecord | "bad_credentials" | "revoked" | "limited"> {
  const row = username ? systemStatements(db).credentials.get({ username }) : undefined;
  // Checked even without a row, so an unknown user name costs the same time as a wrong password.
  const check = await checkGatewayPassword(password ?? "", row ? { key: row.id, hash: row.passwordHash } : null, gate);
  if (check === "limited") return check;
  if (!row || !check.ok || password === undefined) {
    gate?.settled(false);
    return "bad_credentials";
  }
  if (check.rehashed) {
    // Only over the hash just checked: a rotation meanwhile wins.
    db.update(gateways)
      .set({ passwordHash: check.rehashed })
      .where(and(eq(gateways.id, row.id), eq(gateways.passwordHash, row.passwordHash)))
      .run();
  }
  // A retired site's gateways are refused like revoked ones: its record stays, its data stops.
  const refused = row.revokedAt !== null || row.siteRetiredAt !== null;
  gate?.settled(!refused);
  if (refused) return "revoked";
  return {
    gatewayId: row.id,
    siteId: row.siteId,
    protocol: row.protocol,
    groupId: row.groupId,
    edgeNodeId: row.edgeNodeId,
  };
}

export interface IngestPoint {
  pointId: number;
  siteId: string;
  unit: WireUnitCode;
  measure: Measure;
  states: readonly string[] | null;
  expectedIntervalS: number;
}

export interface IngestGateway extends GatewayIdentityRecord {
  revoked: boolean;
  /** gateway point name → point */
  map: Map<string, IngestPoint>;
  silenceMs: number;
}

export function loadIngestGateway(db: Db, gatewayId: string): IngestGateway | null {
  const found = db
    .select({ g: gateways, siteRetiredAt: sites.retiredAt })
    .from(gateways)
    .innerJoin(sites, eq(sites.id, gateways.siteId))
    .where(eq(gateways.id, gatewayId))
    .get();
  if (!found) return null;
  const { g } = found;
  const rows = db
    .select({
      name: gatewayPointMaps.gatewayPoint,
      unit: gatewayPointMaps.unit,
      pointId: points.id,
      quantity: points.quantity,
      expectedIntervalS: points.expectedIntervalS,
    })
    .from(gatewayPointMaps)
    .innerJoin(points, eq(points.id, gatewayPointMaps.pointId))
    .where(eq(gatewayPointMaps.gatewayId, gatewayId))
    .all();
  const map = new Map<string, IngestPoint>();
  let slowest = 0;
  for (const r of rows) {
    const q = quantities[r.quantity as QuantityKey];
    if (!q) continue;
    slowest = Math.max(slowest, r.expectedIntervalS);
    map.set(r.name, {
      pointId: r.pointId,
      siteId: g.siteId,
      unit: r.unit as WireUnitCode,
      measure: q.measure,
      states: "states" in q ? q.states : null,
      expectedIntervalS: r.expectedIntervalS,
    });
  }
  return {
    gatewayId: g.id,
    siteId: g.siteId,
    protocol: g.protocol,
    groupId: g.groupId,
    edgeNodeId: g.edgeNodeId,
    revoked: g.revokedAt !== null || found.siteRetiredAt !== null,
    map,
    silenceMs: silenceMs(slowest),
  };
}

/** External broker mode: which gateway a Sparkplug node topic belongs to. */
export function findSparkplugGatewayId(db: Db, groupId: string, edgeNodeId: string): string | null {
  return (
    db
      .select({ id: gateways.id })
      .from(gateways)
      .where(
        and(eq(gateways.groupId, groupId), eq(gateways.edgeNodeId, edgeNodeId), eq(gateways.protocol, "sparkplug")),
      )
      .get()?.id ?? null
  );
}

export function setGatewayState(db: Db, gatewayId: string, state: GatewayState, at: Date): void {
  systemStatements(db).state.run({ gatewayId, state, at: at.getTime() });
}

/** At start with the embedded broker nobody is connected yet, whatever the rows say. */
export function markAllGatewaysOffline(db: Db, at: Date): void {
  db.update(gateways)
    .set({ state: "offline", stateChangedAt: at })
    .where(and(isNull(gateways.revokedAt), eq(gateways.state, "online")))
    .run();
}

export interface PresenceRow {
  gatewayId: string;
  siteId: string;
  state: GatewayState;
  stateChangedAtMs: number | null;
  lastMessageAtMs: number | null;
  revoked: boolean;
}

export function listGatewayPresence(db: Db): PresenceRow[] {
  return db
    .select({
      gatewayId: gateways.id,
      siteId: gateways.siteId,
      state: gateways.state,
      stateChangedAt: gateways.stateChangedAt,
      lastMessageAt: gateways.lastMessageAt,
      revokedAt: gateways.revokedAt,
    })
    .from(gateways)
    .all()
    .map((g) => ({
      gatewayId: g.gatewayId,
      siteId: g.siteId,
      state: g.state,
      stateChangedAtMs: g.stateChangedAt?.getTime() ?? null,
      lastMessageAtMs: g.lastMessageAt?.getTime() ?? null,
      revoked: g.revokedAt !== null,
    }));
}
