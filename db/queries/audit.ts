import "server-only";
import { and, desc, eq, gte, lt, sql, type SQL } from "drizzle-orm";
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

/**
 * Appends many changes by one actor (a 5,000-row point list): the same rows as that many
 * writeAudit calls, through one prepared statement, since building each insert anew costs more
 * than SQLite's write of it.
 */
export function writeAudits(
  db: Pick<Db, "insert">,
  actor: Viewer,
  entries: readonly AuditEntry[],
  atMs = Date.now(),
): void {
  if (entries.length === 0) return;
  // Raw placeholders: bound as given (the time as epoch ms and before/after as JSON text, as the columns store them).
  const p = (name: string) => sql`${sql.placeholder(name)}`;
  const insert = db
    .insert(auditLog)
    .values({
      at: p("at"),
      actorId: p("actorId"),
      actorName: p("actorName"),
      action: p("action"),
      entityType: p("entityType"),
      entityId: p("entityId"),
      siteId: p("siteId"),
      summary: p("summary"),
      before: p("before"),
      after: p("after"),
    })
    .prepare();
  const actorId = actor.userId === "system" ? null : actor.userId;
  const json = (v: unknown) => (v === undefined || v === null ? null : JSON.stringify(v));
  for (const entry of entries) {
    insert.run({
      at: atMs,
      actorId,
      actorName: actor.name,
      action: entry.action,
      entityType: entry.entityType,
      entityId: entry.entityId,
      siteId: entry.siteId ?? null,
      summary: entry.summary,
      before: json(entry.before),
      after: json(entry.after),
    });
  }
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
