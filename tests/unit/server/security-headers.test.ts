import type { IncomingMessage, ServerResponse } from "node:http";
import { describe, expect, it } from "vitest";
import { applySecurityHeaders, contentSecurityPolicy, securityHeaders } from "@/lib/server/security-headers";

const local = { dev: false, https: false, origins: ["http://localhost:3000"] };
const directives = (policy: string) =>
  Object.fromEntries(
    policy.split(";").map((d) => {
      const [name, ...values] = d.trim().split(/\s+/);
      return [name, values];
    }),
  );

describe("Content-Security-Policy (OWASP ASVS 5.0 §3.4.3; CSP Level 3)", () => {
  it("allows scripts by nonce only, and nothing to embed the app or be embedded", () => {
    const d = directives(contentSecurityPolicy("abc123==", local));
    expect(d["default-src"]).toEqual(["'self'"]);
    expect(d["script-src"]).toEqual(["'self'", "'nonce-abc123=='", "'strict-dynamic'"]);
    expect(d["object-src"]).toEqual(["'none'"]);
    expect(d["base-uri"]).toEqual(["'self'"]);
    expect(d["form-action"]).toEqual(["'self'"]);
    expect(d["frame-ancestors"]).toEqual(["'none'"]); // ASVS 5.0 §3.4.6
    expect(d["img-src"]).toEqual(["'self'", "data:", "blob:"]);
    // socket.io's WebSocket on the same origin.
    expect(d["connect-src"]).toEqual(["'self'", "ws://localhost:3000"]);
    expect(d["upgrade-insecure-requests"]).toBeUndefined();
  });

  it("allows eval only in development (Next.js CSP guide: React's development build needs it)", () => {
    expect(contentSecurityPolicy("n", local)).not.toContain("unsafe-eval");
    expect(directives(contentSecurityPolicy("n", { ...local, dev: true }))["script-src"]).toContain("'unsafe-eval'");
  });

  it("uses wss and upgrades subresources when the public URL is https", () => {
    const d = directives(
      contentSecurityPolicy("n", { dev: false, https: true, origins: ["https://liftline.example"] }),
    );
    expect(d["connect-src"]).toEqual(["'self'", "wss://liftline.example"]);
    expect(d["upgrade-insecure-requests"]).toEqual([]);
  });
});

describe("security headers", () => {
  it("set nosniff, a referrer policy, and DENY framing; HSTS only over https", () => {
    const h = securityHeaders("n", local);
    expect(h["x-content-type-options"]).toBe("nosniff"); // ASVS 5.0 §3.4.4
    expect(h["referrer-policy"]).toBe("strict-origin-when-cross-origin"); // ASVS 5.0 §3.4.5
    expect(h["x-frame-options"]).toBe("DENY"); // RFC 7034
    expect(h["strict-transport-security"]).toBeUndefined();
    // ASVS 5.0 §3.4.1: at least a year, subdomains included.
    expect(securityHeaders("n", { ...local, https: true })["strict-transport-security"]).toBe(
      "max-age=31536000; includeSubDomains",
    );
  });

  it("give every response a fresh nonce of at least 128 bits, and hand the policy to Next on the request", () => {
    const nonces = new Set<string>();
    for (let i = 0; i < 50; i++) {
      const req = {
        headers: { "content-security-policy": "script-src 'nonce-chosen-by-client'" },
      } as unknown as IncomingMessage;
      const set: Record<string, unknown> = {};
      const res = { setHeader: (k: string, v: unknown) => (set[k] = v) } as unknown as ServerResponse;
      applySecurityHeaders(req, res, local);
      expect(req.headers["content-security-policy"]).toBe(set["content-security-policy"]);
      const nonce = /'nonce-([^']+)'/.exec(String(set["content-security-policy"]))![1];
      // CSP Level 3, "Nonce Reuse" (#security-nonces): unique per policy sent, at least 128 bits.
      expect(Buffer.from(nonce, "base64").length).toBeGreaterThanOrEqual(16);
      nonces.add(nonce);
    }
    expect(nonces.size).toBe(50);
  });
});
