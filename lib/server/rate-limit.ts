import { createHash } from "node:crypto";
import { RateLimiterMemory, RateLimiterRes } from "rate-limiter-flexible";
import { SESSION_COOKIES } from "@/lib/auth/session";
import { claimsFromSessionToken } from "@/lib/auth/session-token";
import { AppError } from "@/lib/errors";

// Writes and trend reads per API token and per signed-in user, so one script or one stuck tab
// cannot take the server's time from everyone else (OWASP ASVS 5.0 §2.4.1).

export type RateLimitKind = "writes" | "trends";

export interface ApiRateLimiter {
  /** Counts one request; 0 when it may go ahead, else the seconds until the caller may try again. */
  take(kind: RateLimitKind, key: string): Promise<number>;
}

export function createApiRateLimiter(opts: { writesPerMin: number; trendsPerMin: number }): ApiRateLimiter {
  const limiters: Record<RateLimitKind, RateLimiterMemory> = {
    writes: new RateLimiterMemory({ keyPrefix: "writes", points: opts.writesPerMin, duration: 60 }),
    trends: new RateLimiterMemory({ keyPrefix: "trends", points: opts.trendsPerMin, duration: 60 }),
  };
  return {
    async take(kind, key) {
      try {
        await limiters[kind].consume(key);
        return 0;
      } catch (res) {
        if (res instanceof RateLimiterRes) return Math.max(1, Math.ceil(res.msBeforeNext / 1000));
        throw res;
      }
    },
  };
}

export interface PasswordResetLimiter {
  /** Counts one request for a typed e-mail from an address; 0 when it may go ahead, else seconds to wait. */
  take(email: string, address: string): Promise<number>;
}

/**
 * Reset requests mail a person, so they are limited per typed address (no mailbox flooding) and per
 * client address (no spraying of many addresses), whether or not the account exists: the limit
 * itself tells nothing about an account (OWASP Forgot Password Cheat Sheet).
 */
export function createPasswordResetLimiter(opts: {
  perAccountPerHour: number;
  perAddressPerHour: number;
}): PasswordResetLimiter {
  const perAccount = new RateLimiterMemory({
    keyPrefix: "reset-account",
    points: opts.perAccountPerHour,
    duration: 3600,
  });
  const perAddress = new RateLimiterMemory({
    keyPrefix: "reset-address",
    points: opts.perAddressPerHour,
    duration: 3600,
  });
  const consume = async (limiter: RateLimiterMemory, key: string) => {
    try {
      await limiter.consume(key);
      return 0;
    } catch (res) {
      if (res instanceof RateLimiterRes) return Math.max(1, Math.ceil(res.msBeforeNext / 1000));
      throw res;
    }
  };
  return {
    async take(email, address) {
      const byAddress = await consume(perAddress, address);
      if (byAddress > 0) return byAddress;
      return consume(perAccount, email);
    },
  };
}

const WRITE_METHODS = new Set(["POST", "PUT", "PATCH", "DELETE"]);

function cookieValue(header: string | null, name: string): string | undefined {
  for (const part of header?.split(";") ?? []) {
    const eq = part.indexOf("=");
    if (eq > 0 && part.slice(0, eq).trim() === name) return decodeURIComponent(part.slice(eq + 1).trim());
  }
  return undefined;
}

/**
 * Whom a request is counted against: its API token (by the token's SHA-256, the same value that
 * identifies the token's row) or its session's user. Null for a request with neither; the route
 * answers 401 or, for an e-mailed acknowledge link, needs no session.
 */
export async function requesterKey(request: Request, secret: string | undefined): Promise<string | null> {
  const bearer = /^Bearer\s+(\S+)$/i.exec(request.headers.get("authorization") ?? "");
  if (bearer) return `token:${createHash("sha256").update(bearer[1]).digest("hex")}`;
  if (!secret) return null;
  const cookie = request.headers.get("cookie");
  for (const name of SESSION_COOKIES) {
    const token = cookieValue(cookie, name);
    const userId = token ? (await claimsFromSessionToken(token, secret))?.userId : null;
    if (userId) return `user:${userId}`;
  }
  return null;
}

/** The 429 answer (RFC 6585 §4, with Retry-After per RFC 9110 §10.2.3), or null to go ahead. */
export async function rateLimitRefusal(
  request: Request,
  kind: RateLimitKind | undefined,
  limiter: ApiRateLimiter,
): Promise<Response | null> {
  const counted = kind ?? (WRITE_METHODS.has(request.method) ? "writes" : undefined);
  if (!counted) return null;
  const key = await requesterKey(request, process.env.NEXTAUTH_SECRET);
  if (!key) return null;
  const waitS = await limiter.take(counted, key);
  if (waitS === 0) return null;
  const error = new AppError("rate_limited", `Too many requests; try again in ${waitS} s.`);
  return Response.json(error.toBody(), { status: 429, headers: { "retry-after": String(waitS) } });
}
