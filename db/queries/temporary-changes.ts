import "server-only";
import { randomUUID } from "node:crypto";
import { and, asc, desc, eq, inArray, isNull, lte, type SQL } from "drizzle-orm";
import { alias } from "drizzle-orm/sqlite-core";
import type { Db } from "../client";
import { equipment, sites, temporaryChanges, users } from "../schema";
import { getSiteLatest, type LatestInMemory } from "./readings";
import { siteScope } from "./sites";
import type { Viewer } from "@/lib/auth/viewer";
import type { TemporaryChangeDto } from "@/lib/dto/service";
import type { LatestPointDto } from "@/lib/dto/readings";
import { checkAgainstReading, plainChangeSentence } from "@/lib/service/changes";

// Temporary changes made on a plant to get it going, until someone puts them back. Customers see
// their own sites' changes (in plain words); the reminder timer reads them without a viewer.

const madeByUser = alias(users, "made_by_user");
const putBackUser = alias(users, "put_back_user");

const changeColumns = {
  id: temporaryChanges.id,
  visitId: temporaryChanges.visitId,
  siteId: temporaryChanges.siteId,
  siteTimeZone: sites.timeZone,
  equipmentId: temporaryChanges.equipmentId,
  equipmentTag: equipment.tag,
  equipmentName: equipment.name,
  kind: temporaryChanges.kind,
  what: temporaryChanges.what,
  pointQuantity: temporaryChanges.pointQuantity,
  fromValue: temporaryChanges.fromValue,
  toValue: temporaryChanges.toValue,
  reason: temporaryChanges.reason,
  madeBy: madeByUser.name,
  madeAt: temporaryChanges.madeAt,
  putBackDueAt: temporaryChanges.putBackDueAt,
  putBackAt: temporaryChanges.putBackAt,
  putBackBy: putBackUser.name,
  valueNow: temporaryChanges.valueNow,
  reminders: temporaryChanges.reminders,
  escalatedAt: temporaryChanges.escalatedAt,
};

export interface ChangeFilter {
  siteId?: string;
  visitId?: string;
  /** Only changes not yet put back. */
  inPlace?: boolean;
  changeId?: string;
  equipmentId?: string;
}

export interface ChangeReadOptions {
  nowMs: number;
  /** The running server's newest values, so the live check sees readings not yet written behind. */
  inMemory?: LatestInMemory;
}

export function listTemporaryChanges(
  db: Db,
  viewer: Viewer,
  filter: ChangeFilter,
  opts: ChangeReadOptions,
): TemporaryChangeDto[] {
  const where: (SQL | undefined)[] = [
    siteScope(viewer),
    filter.siteId ? eq(temporaryChanges.siteId, filter.siteId) : undefined,
    filter.visitId ? eq(temporaryChanges.visitId, filter.visitId) : undefined,
    filter.changeId ? eq(temporaryChanges.id, filter.changeId) : undefined,
    filter.equipmentId ? eq(temporaryChanges.equipmentId, filter.equipmentId) : undefined,
    filter.inPlace ? isNull(temporaryChanges.putBackAt) : undefined,
  ];
  const rows = db
    .select(changeColumns)
    .from(temporaryChanges)
    .innerJoin(sites, eq(sites.id, temporaryChanges.siteId))
    .innerJoin(madeByUser, eq(madeByUser.id, temporaryChanges.madeBy))
    .leftJoin(putBackUser, eq(putBackUser.id, temporaryChanges.putBackBy))
    .leftJoin(equipment, eq(equipment.id, temporaryChanges.equipmentId))
    .where(and(...where))
    .orderBy(asc(temporaryChanges.madeAt))
    .all();
  // One latest-values read per site, only when a change names a point that shows its setting.
  const latestBySite = new Map<string, LatestPointDto[]>();
  const latestOf = (siteId: string) => {
    if (!latestBySite.has(siteId))
      latestBySite.set(siteId, getSiteLatest(db, viewer, siteId, opts.nowMs, opts.inMemory).points);
    return latestBySite.get(siteId)!;
  };
  return rows.map(({ siteTimeZone, ...row }) => {
    const r = {
      ...row,
      madeAt: row.madeAt.getTime(),
      putBackDueAt: row.putBackDueAt.getTime(),
      putBackAt: row.putBackAt?.getTime() ?? null,
      escalatedAt: row.escalatedAt?.getTime() ?? null,
    };
    let liveCheck: TemporaryChangeDto["liveCheck"] = null;
    if (r.pointQuantity && r.equipmentId) {
      const point = latestOf(r.siteId).find((p) => p.equipmentId === r.equipmentId && p.quantity === r.pointQuantity);
      if (point && point.tsMs !== null) liveCheck = checkAgainstReading(r, point);
    }
    return {
      ...r,
      plainText: plainChangeSentence(r, siteTimeZone, opts.nowMs),
      liveCheck,
    };
  });
}

export function getTemporaryChange(
  db: Db,
  viewer: Viewer,
  changeId: string,
  opts: ChangeReadOptions,
): TemporaryChangeDto | null {
  return listTemporaryChanges(db, viewer, { changeId }, opts)[0] ?? null;
}

export type NewTemporaryChange = Omit<
  typeof temporaryChanges.$inferInsert,
  "id" | "putBackAt" | "putBackBy" | "valueNow" | "lastRemindedAt" | "reminders" | "escalatedAt"
>;

export function insertTemporaryChange(db: Pick<Db, "insert">, row: NewTemporaryChange): string {
  const id = randomUUID();
  db.insert(temporaryChanges)
    .values({ id, ...row })
    .run();
  return id;
}

/** The stored row, for the use cases that check state before they write (authorize first). */
export function temporaryChangeRow(db: Pick<Db, "select">, changeId: string) {
  return db.select().from(temporaryChanges).where(eq(temporaryChanges.id, changeId)).get() ?? null;
}

export function markPutBack(
  db: Pick<Db, "update">,
  changeId: string,
  by: { userId: string; atMs: number; valueNow: string },
): boolean {
  return (
    db
      .update(temporaryChanges)
      .set({ putBackAt: new Date(by.atMs), putBackBy: by.userId, valueNow: by.valueNow })
      .where(and(eq(temporaryChanges.id, changeId), isNull(temporaryChanges.putBackAt)))
      .run().changes === 1
  );
}

export function inPlaceCountForVisit(db: Pick<Db, "select">, visitId: string): number {
  return db
    .select({ id: temporaryChanges.id })
    .from(temporaryChanges)
    .where(and(eq(temporaryChanges.visitId, visitId), isNull(temporaryChanges.putBackAt)))
    .all().length;
}

/** Changes in place past their put-back-by time, for the reminder timer (no viewer: the server itself). */
export function overdueChanges(db: Db, nowMs: number) {
  return db
    .select({
      id: temporaryChanges.id,
      siteId: temporaryChanges.siteId,
      siteName: sites.name,
      siteTimeZone: sites.timeZone,
      visitId: temporaryChanges.visitId,
      equipmentTag: equipment.tag,
      kind: temporaryChanges.kind,
      what: temporaryChanges.what,
      fromValue: temporaryChanges.fromValue,
      toValue: temporaryChanges.toValue,
      reason: temporaryChanges.reason,
      madeBy: madeByUser.name,
      madeAt: temporaryChanges.madeAt,
      putBackDueAt: temporaryChanges.putBackDueAt,
      lastRemindedAt: temporaryChanges.lastRemindedAt,
      reminders: temporaryChanges.reminders,
      escalatedAt: temporaryChanges.escalatedAt,
    })
    .from(temporaryChanges)
    .innerJoin(sites, eq(sites.id, temporaryChanges.siteId))
    .innerJoin(madeByUser, eq(madeByUser.id, temporaryChanges.madeBy))
    .leftJoin(equipment, eq(equipment.id, temporaryChanges.equipmentId))
    .where(and(isNull(temporaryChanges.putBackAt), lte(temporaryChanges.putBackDueAt, new Date(nowMs))))
    .orderBy(asc(temporaryChanges.putBackDueAt))
    .all()
    .map((r) => ({
      ...r,
      madeAt: r.madeAt.getTime(),
      putBackDueAt: r.putBackDueAt.getTime(),
      lastRemindedAt: r.lastRemindedAt?.getTime() ?? null,
      escalatedAt: r.escalatedAt?.getTime() ?? null,
    }));
}

/** Counts a reminder sent; the condition keeps two passes from counting one reminder twice. */
export function recordReminder(
  db: Db,
  changeId: string,
  expectedReminders: number,
  atMs: number,
  escalated: boolean,
): boolean {
  return (
    db
      .update(temporaryChanges)
      .set({
        reminders: expectedReminders + 1,
        lastRemindedAt: new Date(atMs),
        ...(escalated ? { escalatedAt: new Date(atMs) } : {}),
      })
      .where(
        and(
          eq(temporaryChanges.id, changeId),
          eq(temporaryChanges.reminders, expectedReminders),
          isNull(temporaryChanges.putBackAt),
        ),
      )
      .run().changes === 1
  );
}

/** Sites (of those given) with changes in place, and how many, for the board cards. */
export function inPlaceBySite(db: Db, viewer: Viewer, siteIds: string[]) {
  if (siteIds.length === 0) return new Map<string, { count: number; oldestMadeAt: number; earliestDueAt: number }>();
  const rows = db
    .select({
      siteId: temporaryChanges.siteId,
      madeAt: temporaryChanges.madeAt,
      putBackDueAt: temporaryChanges.putBackDueAt,
    })
    .from(temporaryChanges)
    .innerJoin(sites, eq(sites.id, temporaryChanges.siteId))
    .where(and(siteScope(viewer), inArray(temporaryChanges.siteId, siteIds), isNull(temporaryChanges.putBackAt)))
    .orderBy(desc(temporaryChanges.madeAt))
    .all();
  const out = new Map<string, { count: number; oldestMadeAt: number; earliestDueAt: number }>();
  for (const r of rows) {
    const cur = out.get(r.siteId);
    const made = r.madeAt.getTime();
    const due = r.putBackDueAt.getTime();
    out.set(
      r.siteId,
      cur
        ? {
            count: cur.count + 1,
            oldestMadeAt: Math.min(cur.oldestMadeAt, made),
            earliestDueAt: Math.min(cur.earliestDueAt, due),
          }
        : { count: 1, oldestMadeAt: made, earliestDueAt: due },
    );
  }
  return out;
}
