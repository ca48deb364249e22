import { decode } from "next-auth/jwt";

// Decoded session tokens by their cookie value, until they expire. Decoding goes to the crypto
// thread pool several times, and under ingestion load every such round trip waits its turn of
// the event loop: caching cut a trend request's tail. The token is sealed and immutable, so its
// decoding never changes; callers still re-read the viewer from the database every time.
const decodedSessions = new Map<string, { userId: string; expMs: number }>();
const DECODED_SESSIONS_MAX = 1000;

/** The user id a next-auth session token carries, or null when it is not valid (any more). */
export async function userIdFromSessionToken(token: string, secret: string): Promise<string | null> {
  const known = decodedSessions.get(token);
  if (known && known.expMs > Date.now()) return known.userId;
  const payload = await decode({ token, secret }).catch(() => null);
  if (!payload?.sub || typeof payload.exp !== "number") return null;
  if (decodedSessions.size >= DECODED_SESSIONS_MAX) decodedSessions.delete(decodedSessions.keys().next().value!);
  decodedSessions.set(token, { userId: payload.sub, expMs: payload.exp * 1000 });
  return payload.sub;
}
