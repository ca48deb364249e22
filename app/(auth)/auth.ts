import { getServerSession, type NextAuthOptions } from "next-auth";
import CredentialsProvider from "next-auth/providers/credentials";
import { cookies } from "next/headers";
import { redirect } from "next/navigation";
import { getDb, signInLimiter } from "@/lib/server/runtime";
import { verifyCredentials, getViewerById, normalizeEmail } from "@/db/queries/users";
import { viewerForToken } from "@/db/queries/tokens";
import { CLIENT_ADDRESS_HEADER, SESSION_COOKIES } from "@/lib/auth/session";
import { userIdFromSessionToken } from "@/lib/auth/session-token";
import type { Viewer } from "@/lib/auth/viewer";
import { AppError } from "@/lib/errors";
import { signInSchema } from "@/lib/schemas/sign-in";

function headerValue(headers: unknown, name: string): string | undefined {
  if (!headers) return undefined;
  if (headers instanceof Headers) return headers.get(name) ?? undefined;
  const v = (headers as Record<string, string | string[] | undefined>)[name];
  return Array.isArray(v) ? v[0] : v;
}

export const authOptions: NextAuthOptions = {
  secret: process.env.NEXTAUTH_SECRET,
  session: { strategy: "jwt", maxAge: 12 * 60 * 60 },
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
        if ((await signInLimiter().retryAfterS(account, address)) > 0) throw new Error("RateLimited");
        const viewer = await verifyCredentials(getDb(), account, parsed.data.password);
        if (!viewer) {
          await signInLimiter().recordFailure(account, address);
          return null;
        }
        await signInLimiter().recordSuccess(account);
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
};

async function sessionUserId(): Promise<string | null> {
  const secret = authOptions.secret;
  const jar = await cookies();
  const name = SESSION_COOKIES.find((n) => jar.has(n));
  // No secret, or a token split over several cookies: next-auth's own reading.
  if (!secret || (!name && SESSION_COOKIES.some((n) => jar.has(`${n}.0`)))) {
    const session = await getServerSession(authOptions);
    return session?.user?.id ?? null;
  }
  return name ? userIdFromSessionToken(jar.get(name)!.value, secret) : null;
}

/** The signed-in viewer, re-read from the database so a disabled account stops at once. */
export async function getViewer(): Promise<Viewer | null> {
  const userId = await sessionUserId();
  if (!userId) return null;
  return getViewerById(getDb(), userId);
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
    return viewer;
  }
  const viewer = await getViewer();
  if (!viewer) throw new AppError("unauthorized", "Sign in or send an API token.");
  return viewer;
}
