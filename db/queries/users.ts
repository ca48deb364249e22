import "server-only";
import { randomUUID } from "node:crypto";
import bcrypt from "bcryptjs";
import { and, eq } from "drizzle-orm";
import type { Db } from "../client";
import { hashPassword, hashPasswordSync, needsRehash } from "../password";
import { users, type NewUser } from "../schema";
import type { Role, Viewer } from "@/lib/auth/viewer";

// A fixed hash to compare against when the account does not exist, at the cost of every stored one.
const DUMMY_HASH = hashPasswordSync("not-a-real-password");

/** The columns a Viewer is made of, for every query that reads one (sessions, API tokens). */
export const viewerColumns = {
  userId: users.id,
  role: users.role,
  organizationId: users.organizationId,
  name: users.name,
  email: users.email,
  unitSystem: users.unitSystem,
};

export function normalizeEmail(email: string): string {
  return email.trim().toLowerCase();
}

export async function verifyCredentials(db: Db, email: string, password: string): Promise<Viewer | null> {
  const row = db
    .select({
      ...viewerColumns,
      passwordHash: users.passwordHash,
      disabled: users.disabled,
      passwordSetAt: users.passwordSetAt,
    })
    .from(users)
    .where(eq(users.email, normalizeEmail(email)))
    .get();
  // Every refusal costs one bcrypt comparison, so the answer's timing does not tell an invited or
  // disabled account from a wrong password or an unknown address.
  const ok = await bcrypt.compare(password, row?.passwordHash ?? DUMMY_HASH);
  if (!row || !ok || row.disabled || row.passwordSetAt === null) return null;
  const { passwordHash, disabled: _disabled, passwordSetAt: _set, ...viewer } = row;
  // A hash made at a lower cost (an older seed) is brought up to the common one while the password is at hand.
  if (needsRehash(passwordHash)) {
    const upgraded = await hashPassword(password);
    db.update(users).set({ passwordHash: upgraded }).where(eq(users.id, row.userId)).run();
  }
  return viewer;
}

/** Name and address of an enabled account, to write to its owner; null when there is none. */
export function findAccountContact(db: Db, email: string): { name: string; email: string } | null {
  return (
    db
      .select({ name: users.name, email: users.email })
      .from(users)
      .where(and(eq(users.email, normalizeEmail(email)), eq(users.disabled, false)))
      .get() ?? null
  );
}

/** An account that may act now: a disabled one is no viewer (its sessions, links and pages stop). */
export function getViewerById(db: Db, userId: string): Viewer | null {
  return (
    db
      .select(viewerColumns)
      .from(users)
      .where(and(eq(users.id, userId), eq(users.disabled, false)))
      .get() ?? null
  );
}

export interface CreateUserInput {
  email: string;
  name: string;
  password: string;
  role: Role;
  organizationId: string;
  unitSystem?: NewUser["unitSystem"];
}

export async function createUser(db: Db, input: CreateUserInput): Promise<Viewer> {
  const id = randomUUID();
  const passwordHash = await hashPassword(input.password);
  db.insert(users)
    .values({
      id,
      email: normalizeEmail(input.email),
      name: input.name,
      passwordHash,
      role: input.role,
      organizationId: input.organizationId,
      unitSystem: input.unitSystem ?? "ip",
      passwordSetAt: new Date(),
    })
    .run();
  return getViewerById(db, id)!;
}

/** Disables or re-enables an account; false when there is no such user. */
export function setUserDisabled(db: Db, userId: string, disabled: boolean): boolean {
  return db.update(users).set({ disabled }).where(eq(users.id, userId)).run().changes > 0;
}

/** Changes what an account may see and do; false when there is no such user. */
export function setUserAccess(db: Db, userId: string, access: { role: Role; organizationId: string }): boolean {
  return db.update(users).set(access).where(eq(users.id, userId)).run().changes > 0;
}

export function setUnitSystem(db: Db, viewer: Viewer, unitSystem: "ip" | "si"): void {
  db.update(users).set({ unitSystem }).where(eq(users.id, viewer.userId)).run();
}
