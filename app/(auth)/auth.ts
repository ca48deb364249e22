import type { NextAuthOptions } from "next-auth";
import CredentialsProvider from "next-auth/providers/credentials";
import { cookies } from "next/headers";
import { redirect } from "next/navigation";
import { getDb, signInAddressDelayMs, signInLimiter } from "@/lib/server/runtime";
import { verifyCredentials, normalizeEmail } from "@/db/queries/users";
import { viewerForToken } from "@/db/queries/tokens";
import { CLIENT_ADDRESS_HEADER, SESSION_MAX_AGE_S, sessionTokenFrom } from "@/lib/auth/session";
import type { Viewer } from "@/lib/auth/viewer";
import { AppError } from "@/lib/errors";
import { signInSchema, slowedError } from "@/lib/schemas/sign-in";
import { endSession, startSession, viewerFromSessionToken } from "@/lib/server/sessions";
import { notifySignInSlowed } from "@/lib/server/sign-in-notice";

function headerValue(headers: unknown, name: string): string | undefined {
  if (!headers) return undefined;
  if (headers instanceof Headers) return headers.get(name) ?? undefined;
  const v = (headers as Record<string, string | string[] | undefined>)[name];
  return Array.isArray(v) ? v[0] : v;
}

export const authOptions: NextAuthOptions = {
  secret: process.env.NEXTAUTH_SECRET,
  session: { strategy: "jwt", maxAge: SESSION_MAX_AGE_S },
  pages: { signIn: "/sign-in", error: "/sign-in" },
  providers: [
    CredentialsProvider({
      name: "E-mail and password",
      credentials: { email: { type: "email" }, password: { type: "password" } },
      async authorize(credentials, req) {
        const parsed = signInSchema.safeParse(credentials);
        if (!parsed.success) return null;
        const account = normalizeEmail(parsed.data.email);
        const address = headerValue(req?.headers, CLIENT_ADDRESS_HEADER) ?? "unknown";
        const limiter = signInLimiter();
        const { accountRetryAfterS, addressRetryAfterS } = limiter.check(account, address);
        if (accountRetryAfterS > 0) {
          limiter.recordRefusal(address);
          throw new Error(slowedError("RateLimited", accountRetryAfterS));
        }
        // A slowed address waits, but its correct passwords still sign in (see lib/auth/sign-in-limiter.ts).
        if (addressRetryAfterS > 0) await new Promise((r) => setTimeout(r, signInAddressDelayMs()));
        const viewer = await verifyCredentials(getDb(), account, parsed.data.password);
        if (!viewer) {
          const outcome = limiter.recordFailure(account, address);
          if (outcome.throttleStarted) notifySignInSlowed(getDb(), account, address, outcome.retryAfterS);
          if (addressRetryAfterS > 0) throw new Error(slowedError("AddressLimited", addressRetryAfterS));
          return null;
        }
        limiter.recordSuccess(account);
        return {
          id: viewer.userId,
          name: viewer.name,
          email: viewer.email,
          role: viewer.role,
          organizationId: viewer.organizationId,
        };
      },
    }),
  ],
  callbacks: {
    jwt({ token, user }) {
      if (user) {
        token.role = user.role;
        token.organizationId = user.organizationId;
        token.sid = startSession(getDb(), user.id);
      }
      return token;
    },
    session({ session, token }) {
      session.user = {
        id: token.sub!,
        name: token.name ?? "",
        email: token.email ?? "",
        role: token.role,
        organizationId: token.organizationId,
      };
      return session;
    },
  },
  events: {
    signOut({ token }) {
      if (typeof token?.sid === "string") endSession(getDb(), token.sid);
    },
  },
};

/** The signed-in viewer: a live session of an enabled account, re-read so signing out or disabling stops it at once. */
export async function getViewer(): Promise<Viewer | null> {
  const secret = authOptions.secret;
  if (!secret) return null;
  const jar = await cookies();
  const token = sessionTokenFrom((name) => jar.get(name)?.value);
  return token ? viewerFromSessionToken(getDb(), token, secret) : null;
}

/** For pages: the viewer, or a redirect to sign-in. */
export async function requirePageViewer(): Promise<Viewer> {
  const viewer = await getViewer();
  if (!viewer) redirect("/sign-in");
  return viewer;
}

/** For route handlers: a bearer token or the session cookie, else 401. */
export async function requireApiViewer(request: Request): Promise<Viewer> {
  const authorization = request.headers.get("authorization");
  if (authorization) {
    const match = /^Bearer\s+(\S+)$/i.exec(authorization);
    const viewer = match ? viewerForToken(getDb(), match[1]) : null;
    if (!viewer) throw new AppError("unauthorized", "The API token is not valid.");
    // A read token only reads; what act and admin tokens may do is checked by canAct/isAdmin (lib/auth/viewer.ts).
    if (viewer.tokenScope === "read" && request.method !== "GET" && request.method !== "HEAD")
      throw new AppError("forbidden", "This API token has the read scope: it can only read.");
    return viewer;
  }
  const viewer = await getViewer();
  if (!viewer) throw new AppError("unauthorized", "Sign in or send an API token.");
  return viewer;
}
