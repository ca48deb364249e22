import type { Db } from "@/db/client";
import { revokeUserSessions } from "@/db/queries/sessions";
import { setUserAccess, setUserDisabled } from "@/db/queries/users";
import type { Role, Viewer } from "@/lib/auth/viewer";
import { notFound } from "@/lib/errors";
import { requireAdmin } from "./guards";
import { getRuntime } from "./runtime";

// Account changes that must reach the running server at once: pages and the API re-read the
// viewer on every request, but an open socket would keep the viewer of its handshake.

/** Disables an account: its sessions end and its live sockets close now (OWASP ASVS 5.0 §7.4.2). */
export function disableUser(db: Db, actor: Viewer, userId: string): void {
  requireAdmin(actor);
  if (!setUserDisabled(db, userId, true)) throw notFound("No such user.");
  revokeUserSessions(db, userId);
  getRuntime()?.disconnectUserSockets(userId);
}

export function enableUser(db: Db, actor: Viewer, userId: string): void {
  requireAdmin(actor);
  if (!setUserDisabled(db, userId, false)) throw notFound("No such user.");
}

/** A new role or organization: sockets reconnect and join again under the new scope. */
export function changeUserAccess(
  db: Db,
  actor: Viewer,
  userId: string,
  access: { role: Role; organizationId: string },
): void {
  requireAdmin(actor);
  if (!setUserAccess(db, userId, access)) throw notFound("No such user.");
  getRuntime()?.disconnectUserSockets(userId);
}
