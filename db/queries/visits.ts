import "server-only";
import { renderQuantities } from "@/lib/quantity-text";
import { randomUUID } from "node:crypto";
import { and, asc, desc, eq, isNull, type SQL } from "drizzle-orm";
import { alias } from "drizzle-orm/sqlite-core";
import type { Db } from "../client";
import { alarms, sites, users, visitAlarms, visitEntries, visits } from "../schema";
import { siteScope } from "./sites";
import { reportWasSent } from "./visit-reports";
import { listTemporaryChanges, type ChangeReadOptions } from "./temporary-changes";
import { canAct, type Viewer } from "@/lib/auth/viewer";
import type { VisitDto, VisitSnapshot, VisitSummaryDto } from "@/lib/dto/service";

// Technicians' visits: times, the running log, linked alarms, parts and the closing summary.
// A customer reads their own sites' visits without the internal log and snapshots.

const technician = alias(users, "technician");
const owner = alias(users, "open_changes_owner");

const summaryColumns = {
  id: visits.id,
  siteId: visits.siteId,
  siteName: sites.name,
  siteTimeZone: sites.timeZone,
  technicianId: visits.technicianId,
  technicianName: technician.name,
  mode: visits.mode,
  origin: visits.origin,
  serviceRequestId: visits.serviceRequestId,
  openedAt: visits.openedAt,
  arrivedAt: visits.arrivedAt,
  departedAt: visits.departedAt,
  closedAt: visits.closedAt,
  summary: visits.summary,
  partsUsed: visits.partsUsed,
  openChangesNote: visits.openChangesNote,
  openChangesOwnerId: visits.openChangesOwner,
  openChangesOwnerName: owner.name,
};

const ms = (d: Date | null) => d?.getTime() ?? null;

function selectSummaries(db: Pick<Db, "select">, where: SQL | undefined): VisitSummaryDto[] {
  return db
    .select(summaryColumns)
    .from(visits)
    .innerJoin(sites, eq(sites.id, visits.siteId))
    .innerJoin(technician, eq(technician.id, visits.technicianId))
    .leftJoin(owner, eq(owner.id, visits.openChangesOwner))
    .where(where)
    .orderBy(desc(visits.openedAt))
    .all()
    .map(({ technicianId, technicianName, openChangesOwnerId, openChangesOwnerName, ...r }) => ({
      ...r,
      technician: { id: technicianId, name: technicianName },
      openChangesOwner: openChangesOwnerId ? { id: openChangesOwnerId, name: openChangesOwnerName ?? "" } : null,
      openedAt: r.openedAt.getTime(),
      arrivedAt: ms(r.arrivedAt),
      departedAt: ms(r.departedAt),
      closedAt: ms(r.closedAt),
    }));
}

export function listVisits(db: Db, viewer: Viewer, filter: { siteId?: string; open?: boolean } = {}) {
  return selectSummaries(
    db,
    and(
      siteScope(viewer),
      filter.siteId ? eq(visits.siteId, filter.siteId) : undefined,
      filter.open ? isNull(visits.closedAt) : undefined,
    ),
  );
}

/** The visit as the viewer may see it, or null (another organization's visit does not exist for them). */
export function getVisitSummary(db: Pick<Db, "select">, viewer: Viewer, visitId: string): VisitSummaryDto | null {
  return selectSummaries(db, and(siteScope(viewer), eq(visits.id, visitId)))[0] ?? null;
}

export function getVisit(db: Db, viewer: Viewer, visitId: string, opts: ChangeReadOptions): VisitDto | null {
  const summary = getVisitSummary(db, viewer, visitId);
  if (!summary) return null;
  const staff = canAct(viewer);
  return readVisit(db, viewer, summary, { full: staff, staffWording: staff }, opts);
}

/**
 * The whole visit for the customer's report: staff always; a customer of the site's organization only
 * once a report was sent (until then the visit's log is the service company's own). Alarm titles use
 * the customer's wording, since the report is written for them.
 */
export function getVisitForReport(db: Db, viewer: Viewer, visitId: string, opts: ChangeReadOptions): VisitDto | null {
  const summary = getVisitSummary(db, viewer, visitId);
  if (!summary) return null;
  if (!canAct(viewer) && !reportWasSent(db, visitId)) return null;
  return readVisit(db, viewer, summary, { full: true, staffWording: false }, opts);
}

function readVisit(
  db: Db,
  viewer: Viewer,
  summary: VisitSummaryDto,
  show: { full: boolean; staffWording: boolean },
  opts: ChangeReadOptions,
): VisitDto {
  const visitId = summary.id;
  const staff = show.staffWording;
  const snapshots = show.full
    ? db
        .select({ open: visits.openSnapshot, close: visits.closeSnapshot })
        .from(visits)
        .where(eq(visits.id, visitId))
        .get()
    : undefined;
  const entries = show.full
    ? db
        .select({
          id: visitEntries.id,
          at: visitEntries.at,
          author: users.name,
          text: visitEntries.text,
          fileId: visitEntries.fileId,
        })
        .from(visitEntries)
        .innerJoin(users, eq(users.id, visitEntries.authorId))
        .where(eq(visitEntries.visitId, visitId))
        .orderBy(asc(visitEntries.at), asc(visitEntries.id))
        .all()
        .map((e) => ({ ...e, at: e.at.getTime() }))
    : null;
  const linked = db
    .select({
      id: alarms.id,
      ruleId: alarms.ruleId,
      equipment: alarms.equipment,
      priority: alarms.priority,
      state: alarms.state,
      detailJson: alarms.detailJson,
    })
    .from(visitAlarms)
    .innerJoin(alarms, eq(alarms.id, visitAlarms.alarmId))
    .where(eq(visitAlarms.visitId, visitId))
    .orderBy(asc(alarms.priority))
    .all()
    .map(({ detailJson, ...a }) => {
      const detail = JSON.parse(detailJson) as { technicianMessage?: string; ownerMessage?: string };
      const title = staff ? detail.technicianMessage : detail.ownerMessage;
      return { ...a, title: title === undefined ? a.ruleId : renderQuantities(title, viewer.unitSystem) };
    });
  return {
    ...summary,
    entries,
    openSnapshot: (snapshots?.open as VisitSnapshot | null | undefined) ?? null,
    closeSnapshot: (snapshots?.close as VisitSnapshot | null | undefined) ?? null,
    alarms: linked,
    changes: listTemporaryChanges(db, viewer, { visitId }, opts),
  };
}

export type NewVisit = Pick<
  typeof visits.$inferInsert,
  "siteId" | "technicianId" | "mode" | "origin" | "serviceRequestId" | "openedAt" | "openSnapshot"
>;

export function insertVisit(db: Pick<Db, "insert">, row: NewVisit): string {
  const id = randomUUID();
  db.insert(visits)
    .values({ id, ...row })
    .run();
  return id;
}

export function updateVisitRow(db: Pick<Db, "update">, visitId: string, set: Partial<typeof visits.$inferInsert>) {
  db.update(visits).set(set).where(eq(visits.id, visitId)).run();
}

export function insertVisitEntry(
  db: Pick<Db, "insert">,
  entry: { visitId: string; atMs: number; authorId: string; text: string; fileId?: string | null },
): number {
  return Number(
    db
      .insert(visitEntries)
      .values({
        visitId: entry.visitId,
        at: new Date(entry.atMs),
        authorId: entry.authorId,
        text: entry.text,
        fileId: entry.fileId ?? null,
      })
      .run().lastInsertRowid,
  );
}

export function linkVisitAlarm(db: Pick<Db, "insert">, visitId: string, alarmId: string): boolean {
  return db.insert(visitAlarms).values({ visitId, alarmId }).onConflictDoNothing().run().changes === 1;
}

/** Open visits an alarm is linked to (the alarm page offers to continue one). */
export function openVisitsForAlarm(db: Db, viewer: Viewer, alarmId: string): VisitSummaryDto[] {
  const ids = db
    .select({ id: visitAlarms.visitId })
    .from(visitAlarms)
    .where(eq(visitAlarms.alarmId, alarmId))
    .all()
    .map((r) => r.id);
  return listVisits(db, viewer, { open: true }).filter((v) => ids.includes(v.id));
}
