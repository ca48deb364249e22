import "server-only";
import { createHash, randomBytes, randomUUID } from "node:crypto";
import { and, asc, eq, isNull, ne, sql } from "drizzle-orm";
import type { Db } from "../client";
import { accountLinks, organizations, users } from "../schema";
import { isAdmin, type Role, type Viewer } from "@/lib/auth/viewer";
import type { AccountDto, OrganizationOptionDto, PersonDto, PersonStatus } from "@/lib/dto/people";
import { normalizeEmail } from "./users";

// People as the admin manages them, a person's own account, and the e-mailed single-use links that
// set a first password (invite) or a forgotten one (reset). No password or link hash leaves this file.

export type LinkPurpose = "invite" | "reset";

const personColumns = {
  id: users.id,
  email: users.email,
  name: users.name,
  role: users.role,
  organizationId: users.organizationId,
  organizationName: organizations.name,
  phone: users.phone,
  disabled: users.disabled,
  passwordSetAt: users.passwordSetAt,
  createdAt: users.createdAt,
};

type PersonRow = {
  id: string;
  email: string;
  name: string;
  role: Role;
  organizationId: string;
  organizationName: string;
  phone: string | null;
  disabled: boolean;
  passwordSetAt: Date | null;
  createdAt: Date;
};

export function personStatus(row: { disabled: boolean; passwordSetAt: Date | null }): PersonStatus {
  return row.disabled ? "disabled" : row.passwordSetAt === null ? "invited" : "active";
}

function toPerson(row: PersonRow): PersonDto {
  return {
    id: row.id,
    email: row.email,
    name: row.name,
    role: row.role,
    organizationId: row.organizationId,
    organizationName: row.organizationName,
    phone: row.phone,
    status: personStatus(row),
    createdAt: row.createdAt.toISOString(),
  };
}

/** Everyone, for administrators only: a person list names every customer's staff. */
export function listPeople(db: Db, viewer: Viewer): PersonDto[] {
  if (!isAdmin(viewer)) return [];
  return db
    .select(personColumns)
    .from(users)
    .innerJoin(organizations, eq(organizations.id, users.organizationId))
    .orderBy(asc(users.name))
    .all()
    .map(toPerson);
}

export function getPerson(db: Db, viewer: Viewer, userId: string): PersonDto | null {
  if (!isAdmin(viewer)) return null;
  const row = db
    .select(personColumns)
    .from(users)
    .innerJoin(organizations, eq(organizations.id, users.organizationId))
    .where(eq(users.id, userId))
    .get();
  return row ? toPerson(row) : null;
}

/** Organizations a person may be put in (not retired), for administrators. */
export function listOrganizationOptions(db: Db, viewer: Viewer): OrganizationOptionDto[] {
  if (!isAdmin(viewer)) return [];
  return db
    .select({ id: organizations.id, name: organizations.name, kind: organizations.kind })
    .from(organizations)
    .where(isNull(organizations.retiredAt))
    .orderBy(asc(organizations.kind), asc(organizations.name))
    .all();
}

export function getOrganizationKind(db: Db, organizationId: string): "service" | "customer" | null {
  return (
    db
      .select({ kind: organizations.kind })
      .from(organizations)
      .where(and(eq(organizations.id, organizationId), isNull(organizations.retiredAt)))
      .get()?.kind ?? null
  );
}

/** The one service organization: staff always belong to it. */
export function getServiceOrganizationId(db: Db): string | null {
  return (
    db
      .select({ id: organizations.id })
      .from(organizations)
      .where(eq(organizations.kind, "service"))
      .orderBy(asc(organizations.createdAt))
      .get()?.id ?? null
  );
}

export function emailTaken(db: Db, email: string): boolean {
  return !!db
    .select({ id: users.id })
    .from(users)
    .where(eq(users.email, normalizeEmail(email)))
    .get();
}

/**
 * An invited account: `unusableHash` is the hash of a random secret nobody knows, so the row has a
 * real bcrypt hash (sign-in costs the same) and `passwordSetAt` stays null until the person sets one.
 */
export function insertInvitedUser(
  db: Db,
  input: { email: string; name: string; role: Role; organizationId: string; unusableHash: string },
): string {
  const id = randomUUID();
  db.insert(users)
    .values({
      id,
      email: normalizeEmail(input.email),
      name: input.name,
      passwordHash: input.unusableHash,
      role: input.role,
      organizationId: input.organizationId,
      passwordSetAt: null,
    })
    .run();
  return id;
}

/** Enabled administrators other than `exceptUserId` who have set a password (can actually sign in). */
export function countOtherEnabledAdmins(db: Db, exceptUserId: string): number {
  return db
    .select({ n: sql<number>`count(*)` })
    .from(users)
    .where(
      and(
        eq(users.role, "admin"),
        eq(users.disabled, false),
        ne(users.id, exceptUserId),
        sql`${users.passwordSetAt} is not null`,
      ),
    )
    .get()!.n;
}

/** Who a link or reset request is for: enabled accounts only. */
export function findEnabledUserByEmail(db: Db, email: string): { id: string; name: string; email: string } | null {
  return (
    db
      .select({ id: users.id, name: users.name, email: users.email })
      .from(users)
      .where(and(eq(users.email, normalizeEmail(email)), eq(users.disabled, false)))
      .get() ?? null
  );
}

export function getPasswordHash(db: Db, userId: string): string | null {
  return db.select({ h: users.passwordHash }).from(users).where(eq(users.id, userId)).get()?.h ?? null;
}

export function setPasswordHash(db: Db, userId: string, passwordHash: string, atMs = Date.now()): void {
  db.update(users)
    .set({ passwordHash, passwordSetAt: new Date(atMs) })
    .where(eq(users.id, userId))
    .run();
}

export function getAccount(db: Db, viewer: Viewer): AccountDto | null {
  return (
    db
      .select({
        id: users.id,
        email: users.email,
        name: users.name,
        phone: users.phone,
        role: users.role,
        organizationName: organizations.name,
        unitSystem: users.unitSystem,
      })
      .from(users)
      .innerJoin(organizations, eq(organizations.id, users.organizationId))
      .where(eq(users.id, viewer.userId))
      .get() ?? null
  );
}

/** A person's own name, phone and unit system; only the fields given change. */
export function updateAccount(
  db: Db,
  viewer: Viewer,
  fields: { name?: string; phone?: string | null; unitSystem?: "ip" | "si" },
): void {
  const set = Object.fromEntries(Object.entries(fields).filter(([, v]) => v !== undefined));
  if (Object.keys(set).length === 0) return;
  db.update(users).set(set).where(eq(users.id, viewer.userId)).run();
}

// Links carry 256 random bits, so a fast hash is enough: there is nothing to brute-force.
const hashLink = (token: string) => createHash("sha256").update(token).digest("hex");

/**
 * A fresh link for one purpose; the person's earlier unused links of either purpose die, so only the
 * newest e-mail works (a re-sent invitation, a second reset request).
 */
export function createAccountLink(db: Db, userId: string, purpose: LinkPurpose, expiresAtMs: number): string {
  const token = randomBytes(32).toString("base64url");
  endAccountLinks(db, userId);
  db.insert(accountLinks)
    .values({ id: randomUUID(), userId, purpose, tokenHash: hashLink(token), expiresAt: new Date(expiresAtMs) })
    .run();
  return token;
}

/** Every unused link of a person stops working. */
export function endAccountLinks(db: Db, userId: string, nowMs = Date.now()): void {
  db.update(accountLinks)
    .set({ usedAt: new Date(nowMs) })
    .where(and(eq(accountLinks.userId, userId), isNull(accountLinks.usedAt)))
    .run();
}

export type AccountLinkLookup =
  | { ok: true; linkId: string; userId: string; email: string; purpose: LinkPurpose; expiresAtMs: number }
  | { ok: false; reason: "unknown" | "expired" | "used" };

/** What a link is for, without using it; a disabled account's links are unknown. */
export function peekAccountLink(db: Db, token: string, nowMs: number): AccountLinkLookup {
  const row = db
    .select({
      linkId: accountLinks.id,
      userId: accountLinks.userId,
      purpose: accountLinks.purpose,
      expiresAt: accountLinks.expiresAt,
      usedAt: accountLinks.usedAt,
      email: users.email,
      disabled: users.disabled,
    })
    .from(accountLinks)
    .innerJoin(users, eq(users.id, accountLinks.userId))
    .where(eq(accountLinks.tokenHash, hashLink(token)))
    .get();
  if (!row || row.disabled) return { ok: false, reason: "unknown" };
  if (row.usedAt !== null) return { ok: false, reason: "used" };
  if (row.expiresAt.getTime() <= nowMs) return { ok: false, reason: "expired" };
  return {
    ok: true,
    linkId: row.linkId,
    userId: row.userId,
    email: row.email,
    purpose: row.purpose,
    expiresAtMs: row.expiresAt.getTime(),
  };
}

/** Marks a peeked link used exactly once; false when another request used it first. */
export function markAccountLinkUsed(db: Db, linkId: string, nowMs: number): boolean {
  return (
    db
      .update(accountLinks)
      .set({ usedAt: new Date(nowMs) })
      .where(and(eq(accountLinks.id, linkId), isNull(accountLinks.usedAt)))
      .run().changes === 1
  );
}
