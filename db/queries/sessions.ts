import "server-only";
import { randomUUID } from "node:crypto";
import { and, eq, isNull, lt, ne } from "drizzle-orm";
import type { Db } from "../client";
import { sessions, users } from "../schema";
import type { Viewer } from "@/lib/auth/viewer";
import { viewerColumns } from "./users";

// Browser sessions: the cookie stays a sealed JWT, and this row is what signing out ends.

/** How often a session's `last_seen_at` is written: each request would be a write per page view. */
const LAST_SEEN_EVERY_MS = 60_000;

/** A viewer read through a live session; `sessionId` lets the socket server end one session's sockets. */
export interface SessionViewer extends Viewer {
  sessionId: string;
}

export function createSession(db: Db, userId: string): string {
  const id = randomUUID();
  db.insert(sessions).values({ id, userId, lastSeenAt: new Date() }).run();
  return id;
}

/** The viewer behind a session that is neither revoked nor its account's disabled; null otherwise. */
export function getSessionViewer(db: Db, userId: string, sessionId: string): SessionViewer | null {
  const row = db
    .select({
      sessionId: sessions.id,
      lastSeenAt: sessions.lastSeenAt,
      ...viewerColumns,
    })
    .from(sessions)
    .innerJoin(users, eq(users.id, sessions.userId))
    .where(
      and(
        eq(sessions.id, sessionId),
        eq(sessions.userId, userId),
        isNull(sessions.revokedAt),
        eq(users.disabled, false),
      ),
    )
    .get();
  if (!row) return null;
  const now = Date.now();
  if (now - row.lastSeenAt.getTime() >= LAST_SEEN_EVERY_MS)
    db.update(sessions)
      .set({ lastSeenAt: new Date(now) })
      .where(eq(sessions.id, sessionId))
      .run();
  const { lastSeenAt: _seen, ...viewer } = row;
  return viewer;
}

/** Ends one session; true when it was live. */
export function revokeSession(db: Db, sessionId: string): boolean {
  return (
    db
      .update(sessions)
      .set({ revokedAt: new Date() })
      .where(and(eq(sessions.id, sessionId), isNull(sessions.revokedAt)))
      .run().changes > 0
  );
}

/** Ends every session of an account (OWASP ASVS 5.0 §7.4.2: a disabled account keeps none). */
export function revokeUserSessions(db: Db, userId: string): number {
  return db
    .update(sessions)
    .set({ revokedAt: new Date() })
    .where(and(eq(sessions.userId, userId), isNull(sessions.revokedAt)))
    .run().changes;
}

/** Forgets sessions not seen since `beforeMs`; a cookie still naming one is refused, as when revoked. */
export function pruneSessions(db: Db, beforeMs: number): number {
  return db
    .delete(sessions)
    .where(lt(sessions.lastSeenAt, new Date(beforeMs)))
    .run().changes;
}

/** Ends every session of an account but one (a password change keeps the browser that made it). */
export function revokeOtherSessions(db: Db, userId: string, keepSessionId: string): number {
  return db
    .update(sessions)
    .set({ revokedAt: new Date() })
    .where(and(eq(sessions.userId, userId), isNull(sessions.revokedAt), ne(sessions.id, keepSessionId)))
    .run().changes;
}
