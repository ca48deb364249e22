import "server-only";
import { randomUUID } from "node:crypto";
import bcrypt from "bcryptjs";
import { and, eq } from "drizzle-orm";
import type { Db } from "../client";
import { users, type NewUser } from "../schema";
import type { Role, Viewer } from "@/lib/auth/viewer";

/** Cost 12 keeps a hash around 200 ms here: slow for guessing, fine for sign-in. */
const BCRYPT_COST = 12;

// A fixed hash to compare against when the account does not exist, so a missing account
// costs the same time as a wrong password (no account enumeration by timing).
const DUMMY_HASH = bcrypt.hashSync("not-a-real-password", BCRYPT_COST);

const viewerColumns = {
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
    .select({ ...viewerColumns, passwordHash: users.passwordHash, disabled: users.disabled })
    .from(users)
    .where(eq(users.email, normalizeEmail(email)))
    .get();
  const ok = await bcrypt.compare(password, row?.passwordHash ?? DUMMY_HASH);
  if (!row || !ok || row.disabled) return null;
  const { passwordHash: _hash, disabled: _disabled, ...viewer } = row;
  return viewer;
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
  const passwordHash = await bcrypt.hash(input.password, BCRYPT_COST);
  db.insert(users)
    .values({
      id,
      email: normalizeEmail(input.email),
      name: input.name,
      passwordHash,
      role: input.role,
      organizationId: input.organizationId,
      unitSystem: input.unitSystem ?? "ip",
    })
    .run();
  return getViewerById(db, id)!;
}

export function setUnitSystem(db: Db, viewer: Viewer, unitSystem: "ip" | "si"): void {
  db.update(users).set({ unitSystem }).where(eq(users.id, viewer.userId)).run();
}
