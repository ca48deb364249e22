import type { Db } from "@/db/client";
import { findAlarmRef } from "@/db/queries/alarms";
import { writeAudit } from "@/db/queries/audit";
import { getSiteLatest, type LatestInMemory } from "@/db/queries/readings";
import { getServiceRequest } from "@/db/queries/service-requests";
import { canSeeSite } from "@/db/queries/sites";
import {
  getTemporaryChange,
  inPlaceCountForVisit,
  insertTemporaryChange,
  markPutBack,
  temporaryChangeRow,
} from "@/db/queries/temporary-changes";
import {
  getVisit,
  getVisitSummary,
  insertVisit,
  insertVisitEntry,
  linkVisitAlarm,
  updateVisitRow,
} from "@/db/queries/visits";
import { equipment, serviceRequests, storedFiles, users } from "@/db/schema";
import { canAct, type Viewer } from "@/lib/auth/viewer";
import type { TemporaryChangeDto, VisitDto, VisitSnapshot } from "@/lib/dto/service";
import { AppError, notFound } from "@/lib/errors";
import { isQuantityKey } from "@/lib/quantities";
import type {
  CloseVisitInput,
  OpenVisitInput,
  PutBackInput,
  TemporaryChangeInput,
  UpdateVisitInput,
  VisitEntryInput,
} from "@/lib/schemas/service";
import { and, eq, inArray } from "drizzle-orm";
import { getDb, getRuntime } from "./runtime";
import { moveServiceRequest, tellCustomersRequestMoved } from "./service-requests";

// The visit's use cases: each authorizes, writes in one transaction with its audit entry, and
// answers the visit as the caller sees it. Routes call these; tests call them with their own context.

export interface ServiceContext {
  db: Db;
  nowMs: number;
  /** The running server's newest values (absent in a process without the gateway side). */
  inMemory?: LatestInMemory;
  /** The derived values the rules reason with, as of the site's latest event time. */
  derived?: (siteId: string) => unknown;
  /** Mail to customers who opted in (absent where no mailer runs), the app's address for links, a log line. */
  sendMail?: (message: { to: string; subject: string; text: string }) => Promise<void>;
  publicUrl?: string;
  log?: (line: string) => void;
}

/** The context of the running server, for route handlers. */
export function serviceContext(): ServiceContext {
  const runtime = getRuntime();
  return {
    db: getDb(),
    nowMs: Date.now(),
    inMemory: runtime?.latestValue,
    derived: runtime ? (siteId) => runtime.alarms.snapshot(siteId) : undefined,
    sendMail: runtime?.sendMail,
    publicUrl: process.env.NEXTAUTH_URL,
    log: (line) => console.log(line),
  };
}

function requireStaff(viewer: Viewer) {
  if (!canAct(viewer)) throw new AppError("forbidden", "Only the service company's staff can do this.");
}

/** The plant's key numbers now: the derived values and the latest value of every point. */
export function takeSnapshot(ctx: ServiceContext, viewer: Viewer, siteId: string): VisitSnapshot {
  const latest = getSiteLatest(ctx.db, viewer, siteId, ctx.nowMs, ctx.inMemory);
  return {
    atMs: ctx.nowMs,
    derived: ctx.derived?.(siteId) ?? null,
    points: latest.points
      .filter((p) => p.tsMs !== null)
      .map((p) => ({
        equipmentTag: p.equipmentTag,
        quantity: p.quantity,
        value: p.value,
        display: p.display,
        tsMs: p.tsMs,
        stale: p.stale,
      })),
  };
}

/** A visit the viewer may see, for acting on: 404 when not theirs, 403 for a customer. */
function visitToActOn(ctx: ServiceContext, viewer: Viewer, visitId: string, open = true) {
  const visit = getVisitSummary(ctx.db, viewer, visitId);
  if (!visit) throw notFound("No such visit.");
  requireStaff(viewer);
  if (open && visit.closedAt !== null) throw new AppError("conflict", "The visit is closed.");
  return visit;
}

const readVisit = (ctx: ServiceContext, viewer: Viewer, visitId: string): VisitDto =>
  getVisit(ctx.db, viewer, visitId, { nowMs: ctx.nowMs, inMemory: ctx.inMemory })!;

export function openVisit(ctx: ServiceContext, viewer: Viewer, input: OpenVisitInput): VisitDto {
  const { db } = ctx;
  let siteId = input.siteId;
  let origin: "alarm" | "service_request" | "planned" = "planned";
  if (input.alarmId) {
    const alarm = findAlarmRef(db, viewer, input.alarmId);
    if (!alarm) throw notFound("No such alarm.");
    if (siteId && siteId !== alarm.siteId) throw new AppError("bad_request", "The alarm is on another site.");
    siteId = alarm.siteId;
    origin = "alarm";
  } else if (input.serviceRequestId) {
    const request = getServiceRequest(db, viewer, input.serviceRequestId);
    if (!request) throw notFound("No such service request.");
    if (siteId && siteId !== request.siteId) throw new AppError("bad_request", "The request is for another site.");
    requireStaff(viewer);
    if (request.visitId) throw new AppError("conflict", "Someone has already taken this request.");
    if (request.state === "done" || request.state === "cancelled")
      throw new AppError("conflict", `The request is ${request.state}.`);
    siteId = request.siteId;
    origin = "service_request";
  }
  if (!siteId || !canSeeSite(db, viewer, siteId)) throw notFound("No such site.");
  requireStaff(viewer);
  const snapshot = takeSnapshot(ctx, viewer, siteId);
  const visitId = db.transaction(
    (tx) => {
      const id = insertVisit(tx, {
        siteId: siteId!,
        technicianId: viewer.userId,
        mode: input.mode,
        origin,
        serviceRequestId: input.serviceRequestId ?? null,
        openedAt: new Date(ctx.nowMs),
        openSnapshot: snapshot,
      });
      if (input.alarmId) linkVisitAlarm(tx, id, input.alarmId);
      writeAudit(
        tx,
        viewer,
        {
          action: "open",
          entityType: "visit",
          entityId: id,
          siteId,
          summary: `Visit opened (${input.mode.replace("_", " ")}, from ${origin.replace("_", " ")})`,
          after: {
            mode: input.mode,
            origin,
            alarmId: input.alarmId ?? null,
            serviceRequestId: input.serviceRequestId ?? null,
          },
        },
        ctx.nowMs,
      );
      return id;
    },
    { behavior: "immediate" },
  );
  // The customer sees their request taken: the one who took it is assigned.
  if (input.serviceRequestId) {
    const request = getServiceRequest(db, viewer, input.serviceRequestId)!;
    if (request.state === "received" || !request.assignedTo)
      moveServiceRequest(ctx, viewer, input.serviceRequestId, { assignTo: "me", state: "assigned" });
  }
  return readVisit(ctx, viewer, visitId);
}

export function updateVisit(ctx: ServiceContext, viewer: Viewer, visitId: string, input: UpdateVisitInput): VisitDto {
  const timesChange = input.arrive || input.depart;
  const before = visitToActOn(ctx, viewer, visitId, Boolean(timesChange));
  if (input.arrive && before.arrivedAt !== null) throw new AppError("conflict", "Arrival is already recorded.");
  if (input.depart && (input.arrive ? false : before.arrivedAt === null))
    throw new AppError("conflict", "Record the arrival first.");
  if (input.depart && before.departedAt !== null) throw new AppError("conflict", "Departure is already recorded.");
  const now = new Date(ctx.nowMs);
  const set = {
    ...(input.arrive ? { arrivedAt: now } : {}),
    ...(input.depart ? { departedAt: now } : {}),
    ...(input.summary !== undefined ? { summary: input.summary } : {}),
    ...(input.partsUsed !== undefined ? { partsUsed: input.partsUsed } : {}),
  };
  ctx.db.transaction(
    (tx) => {
      updateVisitRow(tx, visitId, set);
      writeAudit(
        tx,
        viewer,
        {
          action: "update",
          entityType: "visit",
          entityId: visitId,
          siteId: before.siteId,
          summary: input.arrive ? "Arrived" : input.depart ? "Departed" : "Visit details changed",
          before: {
            arrivedAt: before.arrivedAt,
            departedAt: before.departedAt,
            summary: before.summary,
            partsUsed: before.partsUsed,
          },
          after: input,
        },
        ctx.nowMs,
      );
    },
    { behavior: "immediate" },
  );
  // On the way: a request the customer is waiting on moves on when the technician starts.
  if (input.arrive && before.serviceRequestId) {
    const request = getServiceRequest(ctx.db, viewer, before.serviceRequestId);
    if (request && (request.state === "received" || request.state === "assigned"))
      moveServiceRequest(ctx, viewer, before.serviceRequestId, { state: "on_the_way" });
  }
  return readVisit(ctx, viewer, visitId);
}

export function addVisitEntry(ctx: ServiceContext, viewer: Viewer, visitId: string, input: VisitEntryInput): VisitDto {
  const visit = visitToActOn(ctx, viewer, visitId);
  if (input.fileId) {
    const file = ctx.db
      .select({ id: storedFiles.id })
      .from(storedFiles)
      .where(and(eq(storedFiles.id, input.fileId), eq(storedFiles.siteId, visit.siteId)))
      .get();
    if (!file) throw new AppError("bad_request", "No such file on this site.");
  }
  ctx.db.transaction(
    (tx) => {
      insertVisitEntry(tx, {
        visitId,
        atMs: ctx.nowMs,
        authorId: viewer.userId,
        text: input.text,
        fileId: input.fileId,
      });
    },
    { behavior: "immediate" },
  );
  return readVisit(ctx, viewer, visitId);
}

export function linkAlarmToVisit(ctx: ServiceContext, viewer: Viewer, visitId: string, alarmId: string): VisitDto {
  const visit = visitToActOn(ctx, viewer, visitId, false);
  const alarm = findAlarmRef(ctx.db, viewer, alarmId);
  if (!alarm) throw notFound("No such alarm.");
  if (alarm.siteId !== visit.siteId) throw new AppError("bad_request", "The alarm is on another site.");
  ctx.db.transaction(
    (tx) => {
      if (linkVisitAlarm(tx, visitId, alarmId))
        writeAudit(
          tx,
          viewer,
          {
            action: "link_alarm",
            entityType: "visit",
            entityId: visitId,
            siteId: visit.siteId,
            summary: "Alarm linked to the visit",
            after: { alarmId },
          },
          ctx.nowMs,
        );
    },
    { behavior: "immediate" },
  );
  return readVisit(ctx, viewer, visitId);
}

export function recordTemporaryChange(
  ctx: ServiceContext,
  viewer: Viewer,
  visitId: string,
  input: TemporaryChangeInput,
): TemporaryChangeDto {
  const visit = visitToActOn(ctx, viewer, visitId);
  const dueMs = Date.parse(input.putBackDueAt);
  if (!(dueMs > ctx.nowMs))
    throw new AppError("bad_request", "The request is not valid.", [
      { path: "putBackDueAt", message: "Put back by a time still to come" },
    ]);
  if (input.equipmentId) {
    const found = ctx.db
      .select({ id: equipment.id })
      .from(equipment)
      .where(and(eq(equipment.id, input.equipmentId), eq(equipment.siteId, visit.siteId)))
      .get();
    if (!found)
      throw new AppError("bad_request", "The request is not valid.", [
        { path: "equipmentId", message: "No such equipment on this site" },
      ]);
  }
  if (input.pointQuantity && !isQuantityKey(input.pointQuantity))
    throw new AppError("bad_request", "The request is not valid.", [
      { path: "pointQuantity", message: "Not a quantity Liftline knows" },
    ]);
  const changeId = ctx.db.transaction(
    (tx) => {
      const row = {
        visitId,
        siteId: visit.siteId,
        equipmentId: input.equipmentId ?? null,
        kind: input.kind,
        what: input.what,
        pointQuantity: input.pointQuantity ?? null,
        fromValue: input.fromValue,
        toValue: input.toValue,
        reason: input.reason,
        madeBy: viewer.userId,
        madeAt: new Date(ctx.nowMs),
        putBackDueAt: new Date(dueMs),
      };
      const id = insertTemporaryChange(tx, row);
      writeAudit(
        tx,
        viewer,
        {
          action: "create",
          entityType: "temporary_change",
          entityId: id,
          siteId: visit.siteId,
          summary: `Temporary change: ${input.what} ${input.fromValue} → ${input.toValue}`,
          after: { ...input },
        },
        ctx.nowMs,
      );
      insertVisitEntry(tx, {
        visitId,
        atMs: ctx.nowMs,
        authorId: viewer.userId,
        text: `Temporary change: ${input.what} ${input.fromValue} → ${input.toValue} (${input.reason}); put back by ${new Date(dueMs).toISOString()}`,
      });
      return id;
    },
    { behavior: "immediate" },
  );
  return getTemporaryChange(ctx.db, viewer, changeId, ctx)!;
}

export function putBackTemporaryChange(
  ctx: ServiceContext,
  viewer: Viewer,
  changeId: string,
  input: PutBackInput,
): TemporaryChangeDto {
  const before = getTemporaryChange(ctx.db, viewer, changeId, ctx);
  if (!before) throw notFound("No such temporary change.");
  requireStaff(viewer);
  ctx.db.transaction(
    (tx) => {
      if (!markPutBack(tx, changeId, { userId: viewer.userId, atMs: ctx.nowMs, valueNow: input.valueNow }))
        throw new AppError("conflict", "This change is already marked put back.");
      writeAudit(
        tx,
        viewer,
        {
          action: "put_back",
          entityType: "temporary_change",
          entityId: changeId,
          siteId: before.siteId,
          summary: `Put back: ${before.what} (now ${input.valueNow})`,
          before: { toValue: before.toValue, putBackAt: null },
          after: { valueNow: input.valueNow, putBackAt: ctx.nowMs },
        },
        ctx.nowMs,
      );
      const visitOpen = temporaryChangeRow(tx, changeId);
      if (visitOpen)
        insertVisitEntry(tx, {
          visitId: visitOpen.visitId,
          atMs: ctx.nowMs,
          authorId: viewer.userId,
          text: `Put back: ${before.what}, now ${input.valueNow}`,
        });
    },
    { behavior: "immediate" },
  );
  return getTemporaryChange(ctx.db, viewer, changeId, ctx)!;
}

export function closeVisit(ctx: ServiceContext, viewer: Viewer, visitId: string, input: CloseVisitInput): VisitDto {
  const visit = visitToActOn(ctx, viewer, visitId);
  const inPlace = inPlaceCountForVisit(ctx.db, visitId);
  if (inPlace > 0) {
    const missing = [
      ...(input.openChangesNote ? [] : [{ path: "openChangesNote", message: "Say why changes stay in place" }]),
      ...(input.openChangesOwnerId ? [] : [{ path: "openChangesOwnerId", message: "Name who will put them back" }]),
    ];
    if (missing.length)
      throw new AppError(
        "conflict",
        `${inPlace} temporary change${inPlace === 1 ? " is" : "s are"} still in place: record why and who will put ${inPlace === 1 ? "it" : "them"} back, or put ${inPlace === 1 ? "it" : "them"} back first.`,
        missing,
      );
    const owner = ctx.db
      .select({ id: users.id })
      .from(users)
      .where(
        and(
          eq(users.id, input.openChangesOwnerId!),
          inArray(users.role, ["admin", "technician"]),
          eq(users.disabled, false),
        ),
      )
      .get();
    if (!owner)
      throw new AppError("bad_request", "The request is not valid.", [
        { path: "openChangesOwnerId", message: "Name a technician or an administrator" },
      ]);
  }
  const snapshot = takeSnapshot(ctx, viewer, visit.siteId);
  const now = new Date(ctx.nowMs);
  ctx.db.transaction(
    (tx) => {
      updateVisitRow(tx, visitId, {
        closedAt: now,
        summary: input.summary,
        closeSnapshot: snapshot,
        ...(visit.arrivedAt !== null && visit.departedAt === null ? { departedAt: now } : {}),
        ...(inPlace > 0 ? { openChangesNote: input.openChangesNote, openChangesOwner: input.openChangesOwnerId } : {}),
      });
      if (visit.serviceRequestId)
        tx.update(serviceRequests)
          .set({ state: "done", updatedAt: now })
          .where(eq(serviceRequests.id, visit.serviceRequestId))
          .run();
      writeAudit(
        tx,
        viewer,
        {
          action: "close",
          entityType: "visit",
          entityId: visitId,
          siteId: visit.siteId,
          summary: inPlace ? `Visit closed with ${inPlace} temporary change(s) in place` : "Visit closed",
          before: { closedAt: null },
          after: {
            closedAt: ctx.nowMs,
            summary: input.summary,
            ...(inPlace
              ? { openChangesNote: input.openChangesNote, openChangesOwnerId: input.openChangesOwnerId }
              : {}),
          },
        },
        ctx.nowMs,
      );
    },
    { behavior: "immediate" },
  );
  if (visit.serviceRequestId) {
    const request = getServiceRequest(ctx.db, viewer, visit.serviceRequestId);
    if (request) tellCustomersRequestMoved(ctx, request);
  }
  return readVisit(ctx, viewer, visitId);
}
