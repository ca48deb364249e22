import "server-only";
import { randomBytes } from "node:crypto";
import { and, asc, count, eq, isNull } from "drizzle-orm";
import type { Db } from "../client";
import { organizations, sites } from "../schema";
import { isAdmin, seesAllSites, type Viewer } from "@/lib/auth/viewer";
import { AppError, notFound } from "@/lib/errors";
import type { CustomerDto } from "@/lib/dto/sites";
import type { CustomerBody } from "@/lib/schemas/customers";
import { writeAudit } from "./audit";
import { requireAdminToChange, setSiteRetiredIn, type Queryable } from "./sites";

// Customer organizations. Staff read them all; a customer's viewer reads only its own; only
// admins change them. Retiring a customer retires its sites in the same transaction.

const columns = {
  id: organizations.id,
  name: organizations.name,
  createdAt: organizations.createdAt,
  retiredAt: organizations.retiredAt,
  retiredBy: organizations.retiredBy,
};

function scope(viewer: Viewer, includeRetired?: boolean) {
  return and(
    eq(organizations.kind, "customer"),
    seesAllSites(viewer) ? undefined : eq(organizations.id, viewer.organizationId),
    includeRetired && isAdmin(viewer) ? undefined : isNull(organizations.retiredAt),
  );
}

/** A customer's own count leaves out training sites, which do not exist for customers. */
function siteCount(db: Queryable, viewer: Viewer, customerId: string): number {
  return db
    .select({ n: count() })
    .from(sites)
    .where(
      and(
        eq(sites.organizationId, customerId),
        isNull(sites.retiredAt),
        seesAllSites(viewer) ? undefined : eq(sites.training, false),
      ),
    )
    .get()!.n;
}

function toDto(db: Queryable, viewer: Viewer, r: CustomerRow): CustomerDto {
  return {
    id: r.id,
    name: r.name,
    createdAtMs: r.createdAt.getTime(),
    retiredAtMs: r.retiredAt?.getTime() ?? null,
    retiredBy: r.retiredBy,
    siteCount: siteCount(db, viewer, r.id),
  };
}

interface CustomerRow {
  id: string;
  name: string;
  createdAt: Date;
  retiredAt: Date | null;
  retiredBy: string | null;
}

export function listCustomers(db: Db, viewer: Viewer, opts: { includeRetired?: boolean } = {}): CustomerDto[] {
  return db
    .select(columns)
    .from(organizations)
    .where(scope(viewer, opts.includeRetired))
    .orderBy(asc(organizations.name))
    .all()
    .map((r) => toDto(db, viewer, r));
}

/** A customer the viewer may see (retired ones too, so their history and restore stay reachable for admins). */
export function getCustomer(db: Queryable, viewer: Viewer, customerId: string): CustomerDto | null {
  const row = db
    .select(columns)
    .from(organizations)
    .where(and(eq(organizations.id, customerId), scope(viewer, true)))
    .get();
  // A retired customer is an admin's business only.
  if (!row || (row.retiredAt && !isAdmin(viewer))) return null;
  return toDto(db, viewer, row);
}

const audited = (c: CustomerDto) => ({ name: c.name, retiredAtMs: c.retiredAtMs });

function newCustomerId(db: Queryable): string {
  for (;;) {
    const id = `org-${randomBytes(5).toString("hex")}`;
    if (!db.select({ id: organizations.id }).from(organizations).where(eq(organizations.id, id)).get()) return id;
  }
}

/** A new customer organization. `id` is for the demo seed's fixed ids. */
export function insertCustomer(db: Db, viewer: Viewer, body: CustomerBody, id?: string): CustomerDto {
  requireAdminToChange(viewer);
  return db.transaction(
    (tx) => {
      const customerId = id ?? newCustomerId(tx);
      if (tx.select({ id: organizations.id }).from(organizations).where(eq(organizations.id, customerId)).get())
        throw new AppError("conflict", "An organization with this id exists.");
      tx.insert(organizations).values({ id: customerId, name: body.name, kind: "customer" }).run();
      const created = getCustomer(tx, viewer, customerId)!;
      writeAudit(tx, viewer, {
        action: "create",
        entityType: "customer",
        entityId: customerId,
        summary: `Added customer ${body.name}`,
        after: audited(created),
      });
      return created;
    },
    { behavior: "immediate" },
  );
}

export function updateCustomer(db: Db, viewer: Viewer, customerId: string, patch: Partial<CustomerBody>): CustomerDto {
  return db.transaction(
    (tx) => {
      const before = getCustomer(tx, viewer, customerId);
      if (!before) throw notFound("No such customer.");
      requireAdminToChange(viewer);
      if (patch.name === undefined || patch.name === before.name) return before;
      tx.update(organizations).set({ name: patch.name }).where(eq(organizations.id, customerId)).run();
      const after = getCustomer(tx, viewer, customerId)!;
      writeAudit(tx, viewer, {
        action: "update",
        entityType: "customer",
        entityId: customerId,
        summary: `Renamed customer ${before.name} to ${after.name}`,
        before: audited(before),
        after: audited(after),
      });
      return after;
    },
    { behavior: "immediate" },
  );
}

/**
 * Retires a customer and every site of it in service, or restores it with the sites that were
 * retired with it (same moment). Returns the customer and the ids of the sites that changed.
 */
export function setCustomerRetired(
  db: Db,
  viewer: Viewer,
  customerId: string,
  retired: boolean,
): { customer: CustomerDto; siteIds: string[] } {
  return db.transaction(
    (tx) => {
      const before = getCustomer(tx, viewer, customerId);
      if (!before) throw notFound("No such customer.");
      requireAdminToChange(viewer);
      if ((before.retiredAtMs !== null) === retired) return { customer: before, siteIds: [] };
      const atMs = Date.now();
      const siteIds = tx
        .select({ id: sites.id })
        .from(sites)
        .where(
          and(
            eq(sites.organizationId, customerId),
            retired ? isNull(sites.retiredAt) : eq(sites.retiredAt, new Date(before.retiredAtMs!)),
          ),
        )
        .all()
        .map((s) => s.id);
      if (retired) for (const siteId of siteIds) setSiteRetiredIn(tx, viewer, siteId, true, atMs);
      tx.update(organizations)
        .set(retired ? { retiredAt: new Date(atMs), retiredBy: viewer.userId } : { retiredAt: null, retiredBy: null })
        .where(eq(organizations.id, customerId))
        .run();
      // Sites come back after their customer: a site of a retired customer cannot be restored.
      if (!retired) for (const siteId of siteIds) setSiteRetiredIn(tx, viewer, siteId, false, atMs);
      const after = getCustomer(tx, viewer, customerId)!;
      writeAudit(
        tx,
        viewer,
        {
          action: retired ? "retire" : "restore",
          entityType: "customer",
          entityId: customerId,
          summary: `${retired ? "Retired" : "Restored"} customer ${after.name}${siteIds.length ? ` and ${siteIds.length} site(s)` : ""}`,
          before: audited(before),
          after: { ...audited(after), siteIds },
        },
        atMs,
      );
      return { customer: after, siteIds };
    },
    { behavior: "immediate" },
  );
}
