import "server-only";
import { and, desc, eq, gte, lt, type SQL } from "drizzle-orm";
import type { Db } from "../client";
import { auditLog, type AuditEntityType } from "../schema";
import { isAdmin, type Viewer } from "@/lib/auth/viewer";

export interface AuditEntry {
  action: string;
  entityType: AuditEntityType;
  entityId: string;
  siteId?: string | null;
  summary: string;
  before?: unknown;
  after?: unknown;
}

/**
 * Appends one administrative change. Call it inside the transaction that makes the change, so
 * the change and its record commit together. A system viewer (userId "system") is stored without an id.
 */
export function writeAudit(db: Pick<Db, "insert">, actor: Viewer, entry: AuditEntry, atMs = Date.now()): void {
  db.insert(auditLog)
    .values({
      at: new Date(atMs),
      actorId: actor.userId === "system" ? null : actor.userId,
      actorName: actor.name,
      action: entry.action,
      entityType: entry.entityType,
      entityId: entry.entityId,
      siteId: entry.siteId ?? null,
      summary: entry.summary,
      before: entry.before ?? null,
      after: entry.after ?? null,
    })
    .run();
}

export interface AuditFilter {
  entityType?: AuditEntityType;
  entityId?: string;
  siteId?: string;
  actorId?: string;
  fromMs?: number;
  toMs?: number;
  /** Entries older than this id (paging backwards). */
  beforeId?: number;
  limit?: number;
}

/** Administrators only: the audit trail names people and holds before/after values of every record. */
export function listAudit(db: Db, viewer: Viewer, filter: AuditFilter = {}) {
  if (!isAdmin(viewer)) return [];
  const where: (SQL | undefined)[] = [
    filter.entityType ? eq(auditLog.entityType, filter.entityType) : undefined,
    filter.entityId ? eq(auditLog.entityId, filter.entityId) : undefined,
    filter.siteId ? eq(auditLog.siteId, filter.siteId) : undefined,
    filter.actorId ? eq(auditLog.actorId, filter.actorId) : undefined,
    filter.fromMs !== undefined ? gte(auditLog.at, new Date(filter.fromMs)) : undefined,
    filter.toMs !== undefined ? lt(auditLog.at, new Date(filter.toMs)) : undefined,
    filter.beforeId !== undefined ? lt(auditLog.id, filter.beforeId) : undefined,
  ];
  return db
    .select()
    .from(auditLog)
    .where(and(...where))
    .orderBy(desc(auditLog.id))
    .limit(Math.min(filter.limit ?? 100, 500))
    .all()
    .map((r) => ({ ...r, at: r.at.getTime() }));
}
