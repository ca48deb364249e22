import { decode } from "next-auth/jwt";

// Decoded session tokens by their cookie value, until they expire. Decoding goes to the crypto
// thread pool several times, and under ingestion load every such round trip waits its turn of
// the event loop: caching cut a trend request's tail. The token is sealed and immutable, so its
// decoding never changes; callers still check the session and re-read the viewer every time.
export interface SessionClaims {
  userId: string;
  /** The sessions row the token belongs to. */
  sessionId: string;
}

const decodedSessions = new Map<string, SessionClaims & { expMs: number }>();
const DECODED_SESSIONS_MAX = 1000;

/** The user and session a next-auth session token carries, or null when it is not valid (any more). */
export async function claimsFromSessionToken(token: string, secret: string): Promise<SessionClaims | null> {
  const known = decodedSessions.get(token);
  if (known && known.expMs > Date.now()) return { userId: known.userId, sessionId: known.sessionId };
  const payload = await decode({ token, secret }).catch(() => null);
  // A token without a session id predates server-side sessions: nothing could sign it out, so it is refused.
  if (!payload?.sub || typeof payload.sid !== "string" || typeof payload.exp !== "number") return null;
  if (decodedSessions.size >= DECODED_SESSIONS_MAX) decodedSessions.delete(decodedSessions.keys().next().value!);
  decodedSessions.set(token, { userId: payload.sub, sessionId: payload.sid, expMs: payload.exp * 1000 });
  return { userId: payload.sub, sessionId: payload.sid };
}
