// Names shared by the parts that read a session outside next-auth itself.

/** next-auth v4 session cookie names; the __Secure- prefix is used when served over https. */
export const SESSION_COOKIES = ["next-auth.session-token", "__Secure-next-auth.session-token"] as const;

/** Set by server.ts from the TCP socket (a client's own value is overwritten); sign-in limits key on it. */
export const CLIENT_ADDRESS_HEADER = "x-liftline-client-address";
