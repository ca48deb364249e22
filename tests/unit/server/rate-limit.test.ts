import { encode } from "next-auth/jwt";
import { describe, expect, it } from "vitest";
import { createApiRateLimiter, rateLimitRefusal, requesterKey } from "@/lib/server/rate-limit";

const SECRET = "a-test-secret-that-is-long-enough-0123456789";

describe("API rate limiter (OWASP ASVS 5.0 §2.4.1)", () => {
  it("counts each kind per key and tells how long to wait once the minute's allowance is used", async () => {
    const limiter = createApiRateLimiter({ writesPerMin: 2, trendsPerMin: 3 });
    expect(await limiter.take("writes", "user:a")).toBe(0);
    expect(await limiter.take("writes", "user:a")).toBe(0);
    const wait = await limiter.take("writes", "user:a");
    expect(wait).toBeGreaterThan(0);
    expect(wait).toBeLessThanOrEqual(60);
    expect(await limiter.take("writes", "user:b")).toBe(0);
    expect(await limiter.take("trends", "user:a")).toBe(0);
  });

  it("answers 429 with Retry-After in whole seconds (RFC 6585 §4, RFC 9110 §10.2.3)", async () => {
    const limiter = createApiRateLimiter({ writesPerMin: 1, trendsPerMin: 1 });
    const post = () =>
      new Request("http://localhost/api/tokens", { method: "POST", headers: { authorization: "Bearer llt_abc" } });
    expect(await rateLimitRefusal(post(), undefined, limiter)).toBeNull();
    const res = await rateLimitRefusal(post(), undefined, limiter);
    expect(res?.status).toBe(429);
    expect(res!.headers.get("retry-after")).toMatch(/^[1-9]\d*$/);
    expect((await res!.json()).error.code).toBe("rate_limited");
    // A GET is counted only where the route asks for it.
    expect(await rateLimitRefusal(new Request("http://localhost/api/sites"), undefined, limiter)).toBeNull();
  });
});

describe("requesterKey", () => {
  it("is the token for a bearer request, and the user for a session cookie", async () => {
    const bearer = (t: string) => new Request("http://localhost/", { headers: { authorization: `Bearer ${t}` } });
    const a = await requesterKey(bearer("llt_one"), SECRET);
    expect(a).toMatch(/^token:[0-9a-f]{64}$/);
    expect(await requesterKey(bearer("llt_one"), SECRET)).toBe(a);
    expect(await requesterKey(bearer("llt_two"), SECRET)).not.toBe(a);

    const session = await encode({
      token: { sub: "user-1", sid: "session-1", role: "technician", organizationId: "org-1" },
      secret: SECRET,
    });
    const cookie = new Request("http://localhost/", { headers: { cookie: `x=1; next-auth.session-token=${session}` } });
    expect(await requesterKey(cookie, SECRET)).toBe("user:user-1");
    const forged = new Request("http://localhost/", { headers: { cookie: "next-auth.session-token=forged" } });
    expect(await requesterKey(forged, SECRET)).toBeNull();
  });
});
