import { beforeAll, describe, expect, it } from "vitest";
import { getLayout, pointMapCsv } from "@/simulator";
import { startSimulatedGateway } from "@/simulator/gateway-client";
import { hasChromium, screenshot, signInAs, useServerAndBrowser, viewports, watchConsole } from "../helpers/browser";
import { adminCookie, api, provisionGateway, putPointMap, waitFor } from "../helpers/mqtt";

// The review page of the power-blip incident in a browser, on a 390-px phone and on a desktop: key
// figures, the stacked trends sharing one cursor, and the timeline, after the simulated night was
// published through the real server.

const SITE = "harborview-mob";

describe.skipIf(!hasChromium)("incident review page", () => {
  const env = useServerAndBrowser();
  let incidentId: string;

  beforeAll(async () => {
    const admin = await adminCookie(env.server);
    const gw = await provisionGateway(env.server, admin, { siteId: SITE, name: "Simulated plant" });
    await putPointMap(env.server, admin, gw.gateway.id, pointMapCsv(getLayout("medical-office")!));
    const sim = startSimulatedGateway({
      mqttUrl: env.server.mqttUrl,
      username: gw.username,
      password: gw.password,
      scenario: "power-blip",
      siteLayout: "medical-office",
      speed: 300,
      seed: 7,
      durationS: 150 * 60,
    });
    await waitFor(async () => sim.status().fractionDone >= 1, 150_000, 500);
    await sim.stop();
    incidentId = await waitFor(
      async () => {
        const r = await api(env.server, admin, `/api/incidents?site=${SITE}`);
        const hit = (r.body.incidents as Array<{ id: string; rootHint: string | null; alarmCount: number }>).find(
          (i) => i.rootHint === "power_event_suspected" && i.alarmCount >= 4,
        );
        return hit?.id;
      },
      60_000,
      1000,
    );
    // Compile the pages once before the browser's clock starts (development servers build on first request).
    await fetch(`${env.server.url}/sign-in`);
    await api(env.server, admin, `/`);
    await api(env.server, admin, `/incidents?site=${SITE}`);
    await api(env.server, admin, `/incidents/${incidentId}`);
  }, 400_000);

  for (const [name, viewport] of Object.entries(viewports))
    it(`shows key figures, synchronized trends and the timeline (${name})`, async () => {
      const context = await env.browser.newContext({ viewport });
      const page = await context.newPage();
      const problems = watchConsole(page);
      await signInAs(page, env.server.url, "luis@tallgrass.example");
      await page.goto(`${env.server.url}/incidents?site=${SITE}`);
      await page.locator("[data-testid=incident-row]").first().waitFor();
      await page.goto(`${env.server.url}/incidents/${incidentId}`);
      await page.locator("[data-testid=incident-trends] .uplot").first().waitFor({ timeout: 60_000 });
      expect(await page.locator("[data-testid=key-figure]").count()).toBe(6);
      const charts = page.locator("[data-testid=incident-trends] .uplot");
      expect(await charts.count()).toBeGreaterThanOrEqual(5);
      const rows = page.locator("[data-testid=incident-timeline] li");
      expect(await rows.count()).toBeGreaterThan(10);
      // One cursor: hovering one chart moves the cursor of the others (uPlot cursor sync).
      const over = charts.nth(0).locator(".u-over");
      const box = (await over.boundingBox())!;
      await page.mouse.move(box.x + box.width * 0.6, box.y + box.height / 2);
      const left = (i: number) =>
        charts
          .nth(i)
          .locator(".u-cursor-x")
          .evaluate((el) => (el as HTMLElement).style.transform || (el as HTMLElement).style.left);
      await expect.poll(() => left(2)).not.toBe("");
      expect(await left(2)).toBe(await left(0));
      await screenshot(page, `incident-review-${name}`);
      // No horizontal scroll on the phone; the widest offender is named when there is one.
      const overflow = await page.evaluate(() => {
        const over = document.documentElement.scrollWidth - window.innerWidth;
        const widest = [...document.querySelectorAll("body *")]
          .filter((el) => el.getBoundingClientRect().right > window.innerWidth + 0.5)
          .map((el) => `${el.tagName.toLowerCase()}.${String(el.className).slice(0, 60)}`)
          .slice(0, 5);
        return { over, widest };
      });
      expect(overflow.over, overflow.widest.join(" | ")).toBeLessThanOrEqual(0);
      expect(problems.filter((p) => !p.includes("WebSocket"))).toEqual([]);
      await context.close();
    }, 180_000);
});
