// Names shared by the parts that read a session outside next-auth itself.

/** next-auth v4 session cookie names; the __Secure- prefix is used when served over https. */
export const SESSION_COOKIES = ["next-auth.session-token", "__Secure-next-auth.session-token"] as const;

/** A session cookie's lifetime; the sessions table forgets sessions unseen for longer than this and a day. */
export const SESSION_MAX_AGE_S = 12 * 60 * 60;

/** Set by the server from the TCP socket, or X-Forwarded-For of a trusted proxy (a client's own value is overwritten); sign-in limits key on it. */
export const CLIENT_ADDRESS_HEADER = "x-liftline-client-address";

/**
 * The session token among a request's cookies: whole, or split by next-auth into `name.0`,
 * `name.1`, … when it outgrows one cookie.
 */
export function sessionTokenFrom(cookie: (name: string) => string | undefined): string | undefined {
  for (const name of SESSION_COOKIES) {
    const whole = cookie(name);
    if (whole) return whole;
    const parts: string[] = [];
    for (let i = 0; i < 32; i++) {
      const part = cookie(`${name}.${i}`);
      if (part === undefined) break;
      parts.push(part);
    }
    if (parts.length > 0) return parts.join("");
  }
  return undefined;
}
