import { describe, expect, it } from "vitest";
import { loadConfig as loadConfigFrom } from "@/lib/server/config";

const loadConfig = (env: Record<string, string>) => loadConfigFrom({ NODE_ENV: "production", ...env });
import { allowedOriginsOf, crossSiteRefusal, isCrossSite, provenanceOf } from "@/lib/server/origin";

const APP = "https://liftline.example";
const allowed = new Set([APP]);

describe("isCrossSite (OWASP ASVS 5.0 §3.5.1)", () => {
  const check = (origin?: string, secFetchSite?: string, hasCookie = true) =>
    isCrossSite({ origin, secFetchSite, hasCookie }, allowed);

  it("goes by Origin when a browser sends it (RFC 6454 §7: scheme, host and port)", () => {
    expect(check(APP)).toBe(false);
    expect(check("https://evil.example")).toBe(true);
    expect(check("https://liftline.example:8443")).toBe(true); // another port: same site, not same origin
    expect(check("http://liftline.example")).toBe(true); // another scheme
    expect(check("null")).toBe(true); // an opaque origin (RFC 6454 §7.3)
    // Origin decides even when Sec-Fetch-Site says otherwise.
    expect(check("https://evil.example", "same-origin")).toBe(true);
  });

  it("falls back to Sec-Fetch-Site, where only same-origin passes (W3C Fetch Metadata §2.4)", () => {
    expect(check(undefined, "same-origin")).toBe(false);
    expect(check(undefined, "same-site")).toBe(true);
    expect(check(undefined, "cross-site")).toBe(true);
    expect(check(undefined, "none")).toBe(true);
  });

  it("refuses a cookie with neither header, and lets a request without ambient credentials through", () => {
    expect(check(undefined, undefined, true)).toBe(true);
    expect(check(undefined, undefined, false)).toBe(false);
  });

  it("reads the same from a Node request's headers (the socket.io handshake)", () => {
    expect(provenanceOf({ origin: APP, cookie: "a=b" })).toEqual({
      origin: APP,
      secFetchSite: undefined,
      hasCookie: true,
    });
    expect(provenanceOf({ "sec-fetch-site": "same-origin" })).toEqual({
      origin: undefined,
      secFetchSite: "same-origin",
      hasCookie: false,
    });
  });
});

describe("crossSiteRefusal", () => {
  const request = (method: string, headers: Record<string, string>) =>
    new Request(`${APP}/api/tokens`, { method, headers });

  it("leaves safe methods alone (RFC 9110 §9.2.1)", () => {
    for (const method of ["GET", "HEAD", "OPTIONS"])
      expect(crossSiteRefusal(request(method, { cookie: "s=1", origin: "https://evil.example" }), allowed)).toBeNull();
  });

  it("refuses every state-changing method from another origin with 403 and the shared error body", async () => {
    for (const method of ["POST", "PUT", "PATCH", "DELETE"]) {
      const res = crossSiteRefusal(request(method, { cookie: "s=1", origin: "https://evil.example" }), allowed);
      expect(res?.status).toBe(403);
      expect(await res!.json()).toEqual({ error: { code: "forbidden", message: "Cross-site request refused." } });
    }
    expect(crossSiteRefusal(request("POST", { cookie: "s=1", origin: APP }), allowed)).toBeNull();
  });

  it("lets a bearer token without a cookie through from anywhere; with a cookie, Origin still counts", () => {
    const bearer = { authorization: "Bearer llt_x" };
    expect(crossSiteRefusal(request("POST", bearer), allowed)).toBeNull();
    expect(crossSiteRefusal(request("POST", { ...bearer, origin: "https://evil.example" }), allowed)).toBeNull();
    expect(
      crossSiteRefusal(request("POST", { ...bearer, cookie: "s=1", origin: "https://evil.example" }), allowed)?.status,
    ).toBe(403);
  });
});

describe("allowed origins", () => {
  it("are NEXTAUTH_URL's origin and ALLOWED_ORIGINS, each reduced to scheme, host and port", () => {
    const config = loadConfig({
      NEXTAUTH_URL: "https://liftline.example/app/",
      ALLOWED_ORIGINS: " https://plant.example:8443/x , http://10.0.0.5:3000",
    });
    expect([...allowedOriginsOf(config)]).toEqual([
      "https://liftline.example",
      "https://plant.example:8443",
      "http://10.0.0.5:3000",
    ]);
  });

  it("default to localhost on PORT, and refuse a list entry that is not an http(s) URL", () => {
    expect([...allowedOriginsOf(loadConfig({ PORT: "4000" }))]).toEqual(["http://localhost:4000"]);
    expect(() => loadConfig({ ALLOWED_ORIGINS: "liftline.example" })).toThrow(/ALLOWED_ORIGINS/);
    expect(() => loadConfig({ ALLOWED_ORIGINS: "ftp://liftline.example" })).toThrow(/ALLOWED_ORIGINS/);
  });
});
