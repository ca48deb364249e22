import http from "node:http";
import type { Page } from "playwright-core";
import { describe, expect, it } from "vitest";
import { hasChromium, screenshot, signInAs, useServerAndBrowser, viewports, watchConsole } from "../helpers/browser";
import { adminCookie, api, connectGateway, provisionGateway, putPointMap, raiseChillerTrip } from "../helpers/mqtt";
import { freePort } from "../helpers/server";

// Browser security headers on every kind of response, a Content-Security-Policy the app itself passes
// in Chromium (a violation is reported on the console and as a securitypolicyviolation event), and a
// page on another port of the same host that tries to act with the signed-in technician's cookie.

/** Records CSP violations the page reports (CSP Level 3 §5.3, SecurityPolicyViolationEvent). */
async function watchViolations(page: Page): Promise<() => Promise<string[]>> {
  await page.addInitScript(() => {
    const seen: string[] = [];
    (window as unknown as { __violations: string[] }).__violations = seen;
    document.addEventListener("securitypolicyviolation", (e) =>
      seen.push(`${e.effectiveDirective} blocked ${e.blockedURI || "inline"} (${e.sourceFile}:${e.lineNumber})`),
    );
  });
  return () => page.evaluate(() => (window as unknown as { __violations: string[] }).__violations ?? []);
}

describe.skipIf(!hasChromium)("security headers and the Content-Security-Policy", () => {
  const env = useServerAndBrowser();

  it("are on a page, an API answer and a static file (OWASP ASVS 5.0 §3.4)", async () => {
    const page = await fetch(`${env.server.url}/sign-in`);
    const html = await page.text();
    const asset = /(?:src|href)="(\/_next\/static\/[^"]+)"/.exec(html)?.[1];
    expect(asset, "the sign-in page links a static file").toBeTruthy();
    const responses = {
      page,
      api: await fetch(`${env.server.url}/api/health`),
      static: await fetch(env.server.url + asset),
      icon: await fetch(`${env.server.url}/icon.svg`),
    };
    for (const [what, res] of Object.entries(responses)) {
      expect(res.status, what).toBe(200);
      const csp = res.headers.get("content-security-policy") ?? "";
      expect(csp, what).toMatch(/script-src 'self' 'nonce-[A-Za-z0-9+/]+=*' 'strict-dynamic'/);
      expect(csp, what).toContain("frame-ancestors 'none'");
      expect(csp, what).toContain("object-src 'none'");
      expect(res.headers.get("x-content-type-options"), what).toBe("nosniff");
      expect(res.headers.get("referrer-policy"), what).toBe("strict-origin-when-cross-origin");
      expect(res.headers.get("x-frame-options"), what).toBe("DENY");
      // The test server's public URL is http: no HSTS (RFC 6797 §7.2: ignored over http anyway).
      expect(res.headers.get("strict-transport-security"), what).toBeNull();
    }
    // The page's scripts carry the nonce of its own header, and two responses never share one.
    const nonce = /'nonce-([^']+)'/.exec(page.headers.get("content-security-policy")!)![1];
    const scripts = [...html.matchAll(/<script\b[^>]*>/g)].map((m) => m[0]);
    expect(scripts.length).toBeGreaterThan(0);
    for (const tag of scripts) expect(tag).toContain(`nonce="${nonce}"`);
    expect(responses.api.headers.get("content-security-policy")).not.toContain(nonce);
  }, 120_000); // a development server compiles the page on first use

  it("lets a technician sign in and use the board, a site page and a trend page with no console error or violation", async () => {
    // One reading, so the trend page draws its chart.
    const admin = await adminCookie(env.server);
    const gw = await provisionGateway(env.server, admin, { siteId: "harborview-mob" });
    const csv = "gateway_point,equipment,quantity,unit\nCH1-LCHWT,CH-1,chilled_water_leaving_temp,degF\n";
    expect((await putPointMap(env.server, admin, gw.gateway.id, csv)).status).toBe(200);
    const gateway = await connectGateway(env.server, gw);
    await gateway.publishAsync(
      `liftline/${gw.gateway.id}/readings`,
      JSON.stringify({ sentAt: new Date().toISOString(), readings: [{ point: "CH1-LCHWT", value: 44.5 }] }),
      { qos: 1 },
    );
    await gateway.endAsync();
    const { body } = await api(env.server, admin, "/api/sites/harborview-mob/latest");
    const point = (
      body as { latest: { points: Array<{ pointId: number; equipmentTag: string; key: string }> } }
    ).latest.points.find((p) => p.equipmentTag === "CH-1" && p.key === "chilled_water_leaving_temp")!;

    const context = await env.browser.newContext({ viewport: viewports.desktop });
    const page = await context.newPage();
    const problems = watchConsole(page);
    const violations = await watchViolations(page);
    // socket.io's namespace CONNECT answer ("40…"): the WebSocket passed connect-src and the handshake's origin check.
    const socketFrames: string[] = [];
    page.on("websocket", (ws) => {
      if (ws.url().includes("/socket.io/")) ws.on("framereceived", (f) => socketFrames.push(String(f.payload)));
    });

    await signInAs(page, env.server.url, "luis@tallgrass.example");
    await expect.poll(() => page.getByTestId("site-card").count()).toBe(3);
    await expect.poll(() => socketFrames.some((f) => f.startsWith("40")), { timeout: 10_000 }).toBe(true);
    expect(await violations()).toEqual([]);
    // Zod's eval probe would be a violation under the production policy (no 'unsafe-eval'); it runs jitless.
    expect(
      await page.evaluate(
        () => (globalThis as { __zod_globalConfig?: { jitless?: boolean } }).__zod_globalConfig?.jitless,
      ),
    ).toBe(true);

    await page
      .getByRole("link", { name: /Harborview/ })
      .first()
      .click();
    await page.waitForURL(/\/sites\/harborview-mob$/);
    await expect.poll(() => page.getByTestId("equipment").count()).toBeGreaterThan(5);
    expect(await violations()).toEqual([]);

    await page.goto(`${env.server.url}/sites/harborview-mob/points/${point.pointId}`);
    await page.locator("[data-testid=trend] .uplot").waitFor();
    await page.getByRole("button", { name: "30 d" }).click();
    await page
      .getByText(/rollups|Raw readings/)
      .first()
      .waitFor();
    expect(await violations()).toEqual([]);
    await screenshot(page, "trend-under-csp-desktop");

    expect(problems).toEqual([]);
    await context.close();
  }, 180_000);

  it("a page on another port of the same host can neither shelve an alarm nor open a signed-in socket", async () => {
    const admin = await adminCookie(env.server);
    const alarmId = await raiseChillerTrip(env.server, admin, "millbrook-high", "CH-2", "Drive over-temperature");
    const app = env.server.url;
    // Same site as the app (ports do not count for SameSite=Lax cookies), but another origin: a
    // simple request with the cookie needs no CORS preflight (Fetch Standard, CORS-safelisted).
    const attack = `<!doctype html><script>
      window.result = (async () => {
        const res = await fetch(${JSON.stringify(`${app}/api/alarms/${alarmId}/shelve`)}, {
          method: "POST", mode: "no-cors", credentials: "include",
          headers: { "content-type": "text/plain" },
          body: JSON.stringify({ minutes: 60, reason: "forged" }),
        }).catch((e) => String(e));
        const frames = await new Promise((resolve) => {
          const seen = [];
          const ws = new WebSocket(${JSON.stringify(`${app.replace(/^http/, "ws")}/socket.io/?EIO=4&transport=websocket`)});
          ws.onmessage = (e) => { seen.push(String(e.data)); if (String(e.data).startsWith("0")) ws.send("40"); };
          ws.onclose = () => resolve(seen);
          setTimeout(() => { ws.close(); resolve(seen); }, 3000);
        });
        return { fetched: typeof res === "string" ? res : res.type, frames };
      })();
    </script>`;
    const port = await freePort();
    const evil = http.createServer((_req, res) => res.writeHead(200, { "content-type": "text/html" }).end(attack));
    await new Promise<void>((resolve) => evil.listen(port, "127.0.0.1", () => resolve()));
    try {
      const context = await env.browser.newContext();
      const page = await context.newPage();
      await signInAs(page, app, "luis@tallgrass.example");
      await page.goto(`http://localhost:${port}/`);
      const result = (await page.evaluate(() => (window as unknown as { result: Promise<unknown> }).result)) as {
        frames: string[];
      };
      // socket.io protocol v5: "40…" admits the namespace, "44…" refuses it.
      expect(result.frames.some((f) => f.startsWith("40"))).toBe(false);
      expect(result.frames).toContain('44{"message":"forbidden"}');
      const { body } = await api(env.server, admin, `/api/alarms/${alarmId}`);
      expect(body.alarm.state).toBe("unacknowledged");
      await context.close();
    } finally {
      await new Promise((resolve) => evil.close(resolve));
    }
  }, 120_000);
});
