import { randomBytes } from "node:crypto";
import type { IncomingMessage, OutgoingHttpHeaders, ServerResponse } from "node:http";

// Browser security headers on every response the HTTP server sends: pages, the API and static
// files (OWASP ASVS 5.0 §3.4). The policy carries a fresh script nonce per request; Next reads it
// from the request's own Content-Security-Policy header and stamps it on the scripts it renders
// (Next.js guide "Content Security Policy", Nonces).

export interface SecurityHeaderOptions {
  /** React's development build evaluates code for its error overlays; production never needs eval. */
  dev: boolean;
  /** The public URL is https: browsers are told to stay on https (HSTS) and upgrade any http subresource. */
  https: boolean;
  /** The origins pages are served from; their ws(s) twins carry socket.io. */
  origins: readonly string[];
}

export function contentSecurityPolicy(nonce: string, opts: SecurityHeaderOptions): string {
  const sockets = opts.origins.map((o) => o.replace(/^http/, "ws"));
  return [
    "default-src 'self'",
    `script-src 'self' 'nonce-${nonce}' 'strict-dynamic'${opts.dev ? " 'unsafe-eval'" : ""}`,
    // React renders style attributes, which a nonce cannot cover.
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' data: blob:",
    "font-src 'self'",
    `connect-src 'self' ${sockets.join(" ")}`,
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'none'",
    ...(opts.https ? ["upgrade-insecure-requests"] : []),
  ].join("; ");
}

/** The headers for one response; `nonce` must be fresh for every request. */
export function securityHeaders(nonce: string, opts: SecurityHeaderOptions): OutgoingHttpHeaders {
  return {
    "content-security-policy": contentSecurityPolicy(nonce, opts),
    "x-content-type-options": "nosniff",
    // Not no-referrer: under it a browser's form posts send `Origin: null`, which the origin checks refuse
    // (Fetch Standard §3.1, "append a request `Origin` header").
    "referrer-policy": "strict-origin-when-cross-origin",
    "x-frame-options": "DENY",
    // OWASP ASVS 5.0 §3.4.1: at least a year, subdomains included.
    ...(opts.https ? { "strict-transport-security": "max-age=31536000; includeSubDomains" } : {}),
  };
}

/** Sets the headers on `res`, and the policy on `req` so Next renders its scripts with the nonce. */
export function applySecurityHeaders(req: IncomingMessage, res: ServerResponse, opts: SecurityHeaderOptions): void {
  const nonce = randomBytes(16).toString("base64");
  const headers = securityHeaders(nonce, opts);
  // A client's own value is overwritten, as with the client-address header.
  req.headers["content-security-policy"] = headers["content-security-policy"] as string;
  for (const [name, value] of Object.entries(headers)) res.setHeader(name, value!);
}
