import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { hasChromium, launchBrowser, screenshot, signInAs, viewports } from "../helpers/browser";
import { adminCookie, api, raiseChillerTrip, waitFor } from "../helpers/mqtt";
import { decryptPush, newSubscriber, pushesReceived } from "../helpers/notify";
import { freePort, startServer, type TestServer } from "../helpers/server";

// The phone app in Chromium: installable (Chromium finds the manifest and reports no
// installability errors through the DevTools protocol's Page.getInstallabilityErrors, and the
// service worker is activated), push notifications enabled from Settings with the permission
// granted, a critical alarm pushed to the local fake push service and decrypted with the
// subscription's keys, acknowledged once through the notification's token, and the offline page
// showing the last board marked not live, cleared by signing out.
//
// Chromium's own push service is out of reach here, so PushManager.subscribe is replaced (in the
// page, before the app's code) by one returning a subscription at the local fake push service with
// keys the test holds: everything after it — the app's request, the server's encryption and VAPID
// signature, the push service's checks — is the real path.

describe.skipIf(!hasChromium)("the phone app", { timeout: 400_000 }, () => {
  let server: TestServer;
  let browser: Browser;
  let pushSinkUrl: string;
  beforeAll(async () => {
    const pushPort = await freePort();
    pushSinkUrl = `http://127.0.0.1:${pushPort}`;
    server = await startServer({ env: { PUSH_SINK_PORT: String(pushPort) } });
    browser = await launchBrowser();
    // A development-mode server compiles each page on its first request: do it before the clock runs.
    await fetch(`${server.url}/sign-in`);
  }, 300_000);
  afterAll(async () => {
    await browser?.close();
    await server?.stop();
  });

  it("is installable, enables push, decrypts a critical alarm and acknowledges it once by its token", async () => {
    const context = await browser.newContext({ viewport: viewports.phone });
    await context.grantPermissions(["notifications"], { origin: server.url });
    const subscriber = newSubscriber();
    const endpoint = `${pushSinkUrl}/push/browser${Date.now()}`;
    await context.addInitScript(
      ({ endpoint, keys }) => {
        // The subscription a phone's push service would hand out, at the local fake push service.
        PushManager.prototype.subscribe = async function () {
          return { endpoint, toJSON: () => ({ endpoint, expirationTime: null, keys }) } as unknown as PushSubscription;
        };
      },
      { endpoint, keys: subscriber.keys },
    );
    const page = await context.newPage();
    page.setDefaultTimeout(120_000);
    await signInAs(page, server.url, "luis@tallgrass.example");

    // Installable: the manifest is linked and valid, the worker is active, Chromium lists no errors.
    const cdp = await context.newCDPSession(page);
    await expect
      .poll(async () => page.evaluate(async () => (await navigator.serviceWorker.ready).active?.state), {
        timeout: 30_000,
      })
      .toBe("activated");
    const manifest = (await cdp.send("Page.getAppManifest")) as { url: string; errors: unknown[]; data?: string };
    expect(manifest.url).toBe(`${server.url}/manifest.webmanifest`);
    expect(manifest.errors).toEqual([]);
    const parsed = JSON.parse(manifest.data!) as {
      display: string;
      icons: Array<{ sizes: string }>;
      start_url: string;
    };
    expect(parsed.display).toBe("standalone");
    // W3C Web App Manifest + Chromium's install criteria: 192 and 512 px icons.
    expect(parsed.icons.map((i) => i.sizes)).toEqual(expect.arrayContaining(["192x192", "512x512"]));
    const installability = (await cdp.send("Page.getInstallabilityErrors")) as {
      installabilityErrors: Array<{ errorId: string }>;
    };
    // A test's browser context is an off-the-record profile, which Chromium never installs from:
    // that is the one error allowed; any about the manifest, icons or worker fails the test.
    expect(installability.installabilityErrors.map((e) => e.errorId).filter((id) => id !== "in-incognito")).toEqual([]);

    await page.goto(`${server.url}/settings`);
    await page.getByLabel("Device name").fill("test phone");
    await page.getByRole("button", { name: "Enable on this device" }).click();
    await expect.poll(() => page.getByTestId("push-message").textContent()).toContain("Notifications are on");
    await expect.poll(() => page.getByTestId("push-devices").textContent()).toContain("test phone");
    await screenshot(page, "settings-notifications-phone");

    const admin = await adminCookie(server);
    const settings = await api(server, admin, "/api/sites/millbrook-high/rule-settings", {
      method: "PUT",
      headers: { "content-type": "application/json" },
      body: JSON.stringify({ chillerTrip: { priority: 1 } }),
    });
    expect(settings.status).toBe(200);
    const alarmId = await raiseChillerTrip(server, admin, "millbrook-high", "CH-1", "High condenser pressure");
    const [push] = await waitFor(async () => {
      const got = await pushesReceived(pushSinkUrl, endpoint);
      return got.length ? got : undefined;
    }, 15_000);
    const payload = decryptPush(subscriber, push.body) as Record<string, string | number>;
    expect(payload).toMatchObject({ site: "Millbrook High School", equipment: "CH-1", priority: 1, alarmId });

    // The notification's Acknowledge action: the service worker POSTs the token, as here.
    const ackUrl = String(payload.ackUrl);
    const first = await page.evaluate(
      async (url) => (await fetch(`${url}?via=push`, { method: "POST" })).status,
      ackUrl,
    );
    expect(first).toBe(200);
    const alarm = await api(server, admin, `/api/alarms/${alarmId}`);
    expect(alarm.body.alarm.state).toBe("acknowledged");
    const second = await page.evaluate(
      async (url) => (await fetch(`${url}?via=push`, { method: "POST" })).status,
      ackUrl,
    );
    expect(second).toBe(409);
    const deliveries = await api(server, admin, `/api/alarms/${alarmId}/deliveries`);
    expect(deliveries.body.deliveries).toEqual(
      expect.arrayContaining([expect.objectContaining({ path: "push", status: "acknowledged" })]),
    );
    await page.goto(`${server.url}/alarms/${alarmId}`);
    await expect.poll(() => page.getByTestId("alarm-deliveries").textContent()).toContain("acknowledged");
    await screenshot(page, "alarm-notifications-phone");
    await context.close();
  });

  it("offline, shows the last board marked not live; signing out deletes it", async () => {
    const context = await browser.newContext({ viewport: viewports.phone });
    const page = await context.newPage();
    page.setDefaultTimeout(120_000);
    await signInAs(page, server.url, "priya@tallgrass.example");
    await expect.poll(() => page.getByTestId("site-card").count()).toBe(3);
    await expect
      .poll(async () => page.evaluate(async () => (await navigator.serviceWorker.ready).active?.state), {
        timeout: 30_000,
      })
      .toBe("activated");
    // The page must be controlled by the worker for it to answer the next navigation.
    await page.reload();
    await expect.poll(() => page.evaluate(() => Boolean(navigator.serviceWorker.controller))).toBe(true);
    await expect.poll(() => page.evaluate(async () => caches.has("liftline-board"))).toBe(true);

    await context.setOffline(true);
    await page.goto(`${server.url}/`);
    await expect.poll(() => page.getByTestId("not-live").textContent()).toMatch(/Offline — not live.*as it was at/);
    expect(await page.textContent("body")).toContain("Millbrook High School");
    await screenshot(page, "offline-board-phone");
    await context.setOffline(false);

    await page.goto(`${server.url}/`);
    await page.getByRole("button", { name: "Sign out" }).click();
    await page.waitForURL(/\/sign-in/);
    expect(await page.evaluate(async () => caches.has("liftline-board"))).toBe(false);
    await context.setOffline(true);
    await page.goto(`${server.url}/`);
    await expect.poll(() => page.getByTestId("not-live").textContent()).toContain("No board has been saved");
    expect(await page.textContent("body")).not.toContain("Millbrook High School");
    await context.close();
  });
});
