import "server-only";
import { randomUUID } from "node:crypto";
import { and, desc, eq, inArray, type SQL } from "drizzle-orm";
import { alias } from "drizzle-orm/sqlite-core";
import type { Db } from "../client";
import { serviceRequests, sites, users, visits } from "../schema";
import { writeAudit } from "./audit";
import { canSeeSite, siteScope } from "./sites";
import { canAct, type Viewer } from "@/lib/auth/viewer";
import { AppError, notFound } from "@/lib/errors";
import type { ServiceRequestDto, ServiceRequestState } from "@/lib/dto/service";
import type { CreateServiceRequestInput, UpdateServiceRequestInput } from "@/lib/schemas/service";
import { serviceRequestStateText } from "@/lib/service/changes";

// Customers asking for service. A customer creates and reads requests only for their own
// organization's sites; another organization's request is "not found".

const requester = alias(users, "requester");
const assignee = alias(users, "assignee");

const columns = {
  id: serviceRequests.id,
  siteId: serviceRequests.siteId,
  siteName: sites.name,
  siteTimeZone: sites.timeZone,
  requestedBy: requester.name,
  description: serviceRequests.description,
  urgency: serviceRequests.urgency,
  callbackPhone: serviceRequests.callbackPhone,
  state: serviceRequests.state,
  assignedToId: serviceRequests.assignedTo,
  assignedToName: assignee.name,
  createdAt: serviceRequests.createdAt,
  updatedAt: serviceRequests.updatedAt,
};

function select(db: Pick<Db, "select">, where: SQL | undefined) {
  const rows = db
    .select(columns)
    .from(serviceRequests)
    .innerJoin(sites, eq(sites.id, serviceRequests.siteId))
    .innerJoin(requester, eq(requester.id, serviceRequests.requestedBy))
    .leftJoin(assignee, eq(assignee.id, serviceRequests.assignedTo))
    .where(where)
    .orderBy(desc(serviceRequests.createdAt))
    .all();
  const visitByRequest = new Map(
    rows.length
      ? db
          .select({ id: visits.id, requestId: visits.serviceRequestId })
          .from(visits)
          .where(
            inArray(
              visits.serviceRequestId,
              rows.map((r) => r.id),
            ),
          )
          .all()
          .map((v) => [v.requestId, v.id])
      : [],
  );
  return rows.map(({ assignedToId, assignedToName, ...r }): ServiceRequestDto => {
    const assignedTo = assignedToId ? { id: assignedToId, name: assignedToName ?? "" } : null;
    return {
      ...r,
      assignedTo,
      stateText: serviceRequestStateText(r.state, assignedTo?.name ?? null),
      visitId: visitByRequest.get(r.id) ?? null,
      createdAt: r.createdAt.getTime(),
      updatedAt: r.updatedAt.getTime(),
    };
  });
}

export function listServiceRequests(
  db: Db,
  viewer: Viewer,
  filter: { siteId?: string; open?: boolean } = {},
): ServiceRequestDto[] {
  return select(
    db,
    and(
      siteScope(viewer),
      filter.siteId ? eq(serviceRequests.siteId, filter.siteId) : undefined,
      filter.open ? inArray(serviceRequests.state, ["received", "assigned", "on_the_way"]) : undefined,
    ),
  );
}

export function getServiceRequest(db: Pick<Db, "select">, viewer: Viewer, requestId: string): ServiceRequestDto | null {
  return select(db, and(siteScope(viewer), eq(serviceRequests.id, requestId)))[0] ?? null;
}

export function createServiceRequest(
  db: Db,
  viewer: Viewer,
  input: CreateServiceRequestInput,
  nowMs: number,
): ServiceRequestDto {
  if (!canSeeSite(db, viewer, input.siteId)) throw notFound("No such site.");
  const id = randomUUID();
  return db.transaction(
    (tx) => {
      tx.insert(serviceRequests)
        .values({
          id,
          siteId: input.siteId,
          requestedBy: viewer.userId,
          description: input.description,
          urgency: input.urgency,
          callbackPhone: input.callbackPhone,
          state: "received",
          createdAt: new Date(nowMs),
          updatedAt: new Date(nowMs),
        })
        .run();
      writeAudit(
        tx,
        viewer,
        {
          action: "create",
          entityType: "service_request",
          entityId: id,
          siteId: input.siteId,
          summary: `Service request (${input.urgency.replace("_", " ")})`,
          after: input,
        },
        nowMs,
      );
      return getServiceRequest(tx, viewer, id)!;
    },
    { behavior: "immediate" },
  );
}

/**
 * Staff move a request on (assign, on the way, done); a customer may only cancel their own
 * organization's request while nobody has taken it.
 */
export function updateServiceRequest(
  db: Db,
  viewer: Viewer,
  requestId: string,
  input: UpdateServiceRequestInput,
  nowMs: number,
): ServiceRequestDto {
  return db.transaction(
    (tx) => {
      const before = getServiceRequest(tx, viewer, requestId);
      if (!before) throw notFound("No such service request.");
      if (!canAct(viewer)) {
        if (input.assignTo !== undefined || input.state !== "cancelled")
          throw new AppError("forbidden", "Only the service company's staff can move a request on.");
        if (before.state !== "received") throw new AppError("conflict", "A technician has already taken this request.");
      }
      let assignedTo: string | undefined;
      if (input.assignTo !== undefined) {
        assignedTo = input.assignTo === "me" ? viewer.userId : input.assignTo;
        const staff = tx
          .select({ id: users.id })
          .from(users)
          .where(and(eq(users.id, assignedTo), inArray(users.role, ["admin", "technician"]), eq(users.disabled, false)))
          .get();
        if (!staff) throw new AppError("bad_request", "Assign the request to a technician or an administrator.");
      }
      const state: ServiceRequestState =
        input.state ?? (assignedTo !== undefined && before.state === "received" ? "assigned" : before.state);
      tx.update(serviceRequests)
        .set({ state, ...(assignedTo !== undefined ? { assignedTo } : {}), updatedAt: new Date(nowMs) })
        .where(eq(serviceRequests.id, requestId))
        .run();
      const after = getServiceRequest(tx, viewer, requestId)!;
      writeAudit(
        tx,
        viewer,
        {
          action: "update",
          entityType: "service_request",
          entityId: requestId,
          siteId: before.siteId,
          summary: `Service request ${before.state} → ${after.state}`,
          before: { state: before.state, assignedTo: before.assignedTo?.id ?? null },
          after: { state: after.state, assignedTo: after.assignedTo?.id ?? null },
        },
        nowMs,
      );
      return after;
    },
    { behavior: "immediate" },
  );
}
