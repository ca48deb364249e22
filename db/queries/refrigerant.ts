import "server-only";
import { and, asc, eq } from "drizzle-orm";
import type { Db } from "../client";
import { equipment, refrigerantLog, sites, users, visits } from "../schema";
import { siteScope } from "./sites";
import type { Viewer } from "@/lib/auth/viewer";
import { AppError, notFound } from "@/lib/errors";
import type { RefrigerantEntryDto, RefrigerantLogDto } from "@/lib/dto/refrigerant";
import { correctableKinds, summarizeRefrigerantLog, type RefrigerantEntryKind } from "@/lib/refrigerant-log";
import type { RefrigerantEntryInput } from "@/lib/schemas/refrigerant";

// A chiller's refrigerant log. The table is append-only (triggers in the migration): entries are
// only ever inserted, and a mistake is corrected by a new entry naming it. Authorization: the
// chiller's site must be one the viewer may see (a customer reads its own organization's log).

/** The chiller the viewer may see, or null (other kinds of equipment keep no refrigerant log). */
export function findChiller(db: Db, viewer: Viewer, equipmentId: string) {
  const row = db
    .select({
      id: equipment.id,
      siteId: equipment.siteId,
      tag: equipment.tag,
      name: equipment.name,
      kind: equipment.kind,
      refrigerant: equipment.refrigerant,
      record: equipment.record,
    })
    .from(equipment)
    .innerJoin(sites, eq(sites.id, equipment.siteId))
    .where(and(eq(equipment.id, equipmentId), siteScope(viewer)))
    .get();
  return row && row.kind === "chiller" ? row : null;
}

/** The nameplate charge from the chiller's record (`refrigerantChargeKg`), when it has one. */
function recordChargeKg(record: Record<string, unknown>): number | null {
  const v = record.refrigerantChargeKg;
  return typeof v === "number" && Number.isFinite(v) && v > 0 ? v : null;
}

function listEntries(db: Db, equipmentId: string): RefrigerantEntryDto[] {
  return db
    .select({
      id: refrigerantLog.id,
      at: refrigerantLog.at,
      kind: refrigerantLog.kind,
      amountKg: refrigerantLog.amountKg,
      cylinder: refrigerantLog.cylinder,
      reason: refrigerantLog.reason,
      result: refrigerantLog.result,
      correctsId: refrigerantLog.correctsId,
      visitId: refrigerantLog.visitId,
      byId: refrigerantLog.byUser,
      byName: users.name,
      recordedAt: refrigerantLog.recordedAt,
    })
    .from(refrigerantLog)
    .innerJoin(users, eq(users.id, refrigerantLog.byUser))
    .where(eq(refrigerantLog.equipmentId, equipmentId))
    .orderBy(asc(refrigerantLog.at), asc(refrigerantLog.id))
    .all()
    .map(({ byId, byName, at, recordedAt, ...e }) => ({
      ...e,
      at: at.getTime(),
      recordedAt: recordedAt.getTime(),
      by: { id: byId, name: byName },
    }));
}

/** The chiller's log with its figures (charged since the last full charge, leak rates), or null. */
export function getRefrigerantLog(
  db: Db,
  viewer: Viewer,
  equipmentId: string,
  asOfMs = Date.now(),
): RefrigerantLogDto | null {
  const chiller = findChiller(db, viewer, equipmentId);
  if (!chiller) return null;
  const entries = listEntries(db, chiller.id);
  const summary = summarizeRefrigerantLog(
    entries.map((e) => ({
      id: e.id,
      atMs: e.at,
      kind: e.kind,
      amountKg: e.amountKg,
      result: e.result,
      correctsId: e.correctsId,
    })),
    { recordChargeKg: recordChargeKg(chiller.record), asOfMs },
  );
  return {
    equipment: {
      id: chiller.id,
      siteId: chiller.siteId,
      tag: chiller.tag,
      name: chiller.name,
      refrigerant: chiller.refrigerant,
    },
    entries,
    summary,
  };
}

/** Appends an entry to a chiller's log (staff; the route checks the role). Returns the new entry. */
export function addRefrigerantEntry(
  db: Db,
  viewer: Viewer,
  equipmentId: string,
  input: RefrigerantEntryInput,
  nowMs = Date.now(),
): RefrigerantEntryDto {
  const atMs = input.at ? Date.parse(input.at) : nowMs;
  // A few minutes of clock difference between a phone and the server is not "the future".
  if (atMs > nowMs + 5 * 60_000) throw new AppError("bad_request", "The time of an entry cannot be in the future.");
  const id = db.transaction(
    (tx) => {
      const chiller = findChiller(tx as unknown as Db, viewer, equipmentId);
      if (!chiller) throw notFound("No such chiller.");
      if (input.visitId) {
        const visit = tx
          .select({ id: visits.id })
          .from(visits)
          .where(and(eq(visits.id, input.visitId), eq(visits.siteId, chiller.siteId)))
          .get();
        if (!visit) throw notFound("No such visit on this chiller's site.");
      }
      if (input.correctsId !== undefined) {
        const target = tx
          .select({ kind: refrigerantLog.kind })
          .from(refrigerantLog)
          .where(and(eq(refrigerantLog.id, input.correctsId), eq(refrigerantLog.equipmentId, chiller.id)))
          .get();
        if (!target) throw notFound("No such entry in this chiller's log.");
        if (!(correctableKinds as readonly RefrigerantEntryKind[]).includes(target.kind))
          throw new AppError(
            "bad_request",
            "Only an amount added, recovered or charged can be corrected; record a new leak check instead.",
          );
      }
      return tx
        .insert(refrigerantLog)
        .values({
          equipmentId: chiller.id,
          siteId: chiller.siteId,
          visitId: input.visitId ?? null,
          at: new Date(atMs),
          kind: input.kind,
          amountKg: input.amountKg ?? null,
          cylinder: input.cylinder || null,
          reason: input.reason,
          result: input.result ?? null,
          correctsId: input.correctsId ?? null,
          byUser: viewer.userId,
        })
        .returning({ id: refrigerantLog.id })
        .get().id;
    },
    { behavior: "immediate" },
  );
  const entry = listEntries(db, equipmentId).find((e) => e.id === id);
  if (!entry) throw new Error("refrigerant entry vanished after insert");
  return entry;
}
