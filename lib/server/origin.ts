import type { IncomingHttpHeaders } from "node:http";
import { AppError } from "@/lib/errors";
import type { Config } from "./config";

// Browsers attach the session cookie to requests any page makes, so a state-changing request must
// show it comes from one of Liftline's own pages (OWASP ASVS 5.0 §3.5.1, §3.5.2; WebSocket
// handshakes §4.4.2). Origin is compared first; Sec-Fetch-Site stands in when a browser sends no
// Origin (same-origin GETs such as socket.io's polling handshake); a cookie with neither is refused.

const SAFE_METHODS = new Set(["GET", "HEAD", "OPTIONS"]);

/** The origins Liftline's pages are served from: NEXTAUTH_URL's (or localhost:PORT's) and ALLOWED_ORIGINS. */
export function allowedOriginsOf(config: Pick<Config, "NEXTAUTH_URL" | "PORT" | "ALLOWED_ORIGINS">): Set<string> {
  const publicUrl = config.NEXTAUTH_URL ?? `http://localhost:${config.PORT}`;
  return new Set([new URL(publicUrl).origin, ...config.ALLOWED_ORIGINS]);
}

export interface RequestProvenance {
  origin: string | undefined;
  secFetchSite: string | undefined;
  hasCookie: boolean;
}

/** What a Node request's headers say about where it came from (the socket.io handshake). */
export function provenanceOf(headers: IncomingHttpHeaders): RequestProvenance {
  const secFetchSite = headers["sec-fetch-site"];
  return {
    origin: headers.origin,
    secFetchSite: Array.isArray(secFetchSite) ? secFetchSite[0] : secFetchSite,
    hasCookie: headers.cookie !== undefined,
  };
}

/** True when a credentialed request may have been sent by another site's page. */
export function isCrossSite(req: RequestProvenance, allowed: ReadonlySet<string>): boolean {
  // An opaque origin arrives as "null" and is never in the list.
  if (req.origin !== undefined) return !allowed.has(req.origin);
  // "same-site" is refused too: another port on the same host is same-site but not same-origin.
  if (req.secFetchSite !== undefined) return req.secFetchSite !== "same-origin";
  // Neither header: only a request carrying no ambient credential (a script's bearer token, an e-mailed link) passes.
  return req.hasCookie;
}

/** The 403 answer to a cross-site state-changing request, or null to go ahead. */
export function crossSiteRefusal(request: Request, allowed: ReadonlySet<string>): Response | null {
  if (SAFE_METHODS.has(request.method)) return null;
  const h = request.headers;
  const hasCookie = h.has("cookie");
  // A bearer token is never sent by a browser on its own, so it needs no proof of origin.
  if (!hasCookie && /^Bearer\s/i.test(h.get("authorization") ?? "")) return null;
  const provenance = {
    origin: h.get("origin") ?? undefined,
    secFetchSite: h.get("sec-fetch-site") ?? undefined,
    hasCookie,
  };
  if (!isCrossSite(provenance, allowed)) return null;
  return Response.json(new AppError("forbidden", "Cross-site request refused.").toBody(), { status: 403 });
}
