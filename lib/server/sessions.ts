import type { Db } from "@/db/client";
import {
  createSession,
  getSessionViewer,
  pruneSessions,
  revokeSession,
  type SessionViewer,
} from "@/db/queries/sessions";
import { SESSION_MAX_AGE_S } from "@/lib/auth/session";
import { claimsFromSessionToken } from "@/lib/auth/session-token";
import { getRuntime } from "./runtime";

// The one reading of a session cookie for pages, the API and the socket handshake: the sealed
// token names a user and a session, and both must still be live in the database.

/** The viewer behind a session token, or null when the token, its session or its account is not valid. */
export async function viewerFromSessionToken(db: Db, token: string, secret: string): Promise<SessionViewer | null> {
  const claims = await claimsFromSessionToken(token, secret);
  return claims ? getSessionViewer(db, claims.userId, claims.sessionId) : null;
}

/** Starts a session at sign-in, forgetting those unseen for longer than any cookie lives. */
export function startSession(db: Db, userId: string): string {
  pruneSessions(db, Date.now() - (SESSION_MAX_AGE_S + 24 * 3600) * 1000);
  return createSession(db, userId);
}

/** Signing out: the session stops working everywhere, its open sockets included (OWASP ASVS 5.0 §7.4.1). */
export function endSession(db: Db, sessionId: string): void {
  revokeSession(db, sessionId);
  getRuntime()?.disconnectSessionSockets(sessionId);
}
