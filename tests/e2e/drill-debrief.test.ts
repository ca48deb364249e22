import { describe, expect, it } from "vitest";
import { adminCookie, api } from "../helpers/mqtt";
import { signIn } from "../helpers/server";
import { drillClient, jsonPost, warmDrillRoutes } from "../helpers/drills";
import { hasChromium, screenshot, signInAs, useServerAndBrowser, viewports, watchConsole } from "../helpers/browser";

// The debrief of two power-blip drills at 600× on a training site, in a browser: one worked in time by a
// scripted trainee (crossover avoided), one left alone (loops crossed, the late restart fails). The
// supervisor's list shows both for the trainee; the training site's page shows the drill controls with the
// caution text while a drill runs. Screenshots at desktop and at 390 px (the on-call phone).
describe.skipIf(!hasChromium)("drill debrief in a browser", () => {
  const env = useServerAndBrowser();

  it("shows an avoided and a crossed drill", { timeout: 900_000 }, async () => {
    const admin = await adminCookie(env.server);
    const { cookie: trainee } = await signIn(env.server.url, "luis@tallgrass.example");
    const site = await api(
      env.server,
      admin,
      "/api/training-sites",
      jsonPost({ name: "Training plant", layout: "medical-office", protocol: "json" }),
    );
    expect(site.status).toBe(201);
    const siteId = site.body.site.id as string;
    const client = drillClient(env.server, trainee!);

    const ctx = await env.browser.newContext({ viewport: viewports.desktop });
    ctx.setDefaultTimeout(180_000);
    const page = await ctx.newPage();
    const problems = watchConsole(page);
    await signInAs(page, env.server.url, "admin@tallgrass.example");
    // Pages compile on first load in a development server, holding it for seconds: before the 600× drills.
    await page.goto(`${env.server.url}/sites/${siteId}`);
    await page.goto(`${env.server.url}/drills`);
    await page.goto(`${env.server.url}/drills/drill-none`);
    await warmDrillRoutes(env.server, trainee!);
    // The warm-up's missing drill answered 404 on purpose; from here on the pages must be clean.
    problems.length = 0;

    const start = (hints: boolean) =>
      api(
        env.server,
        admin,
        "/api/drills",
        jsonPost({ siteId, traineeId: "user-tech-1", scenario: "power-blip", speed: 600, hints }),
      );
    const worked = await start(true);
    expect(worked.status).toBe(201);
    const workedId = worked.body.drill.id as string;
    await client.actInTime(workedId);
    expect((await client.ended(workedId)).outcome).toBe("avoided");

    const idle = await start(false);
    const idleId = idle.body.drill.id as string;
    // The site page shows the drill controls while it runs (compiled on first load, so the drill may end first).
    await page.goto(`${env.server.url}/sites/${siteId}`);
    await page
      .getByText(/Drill controls|Last drill here/)
      .first()
      .waitFor();
    await screenshot(page, "drill-site-panel-desktop");
    expect((await client.ended(idleId)).outcome).toBe("crossed");

    await page.goto(`${env.server.url}/drills/${workedId}`);
    await page.getByRole("heading", { name: /Crossover avoided/ }).waitFor();
    await expect.poll(() => page.locator("figure canvas").count(), { timeout: 60_000 }).toBeGreaterThan(0);
    await screenshot(page, "drill-debrief-avoided-desktop");
    expect(await page.getByText("The rules advised then:").count()).toBeGreaterThan(0);

    await page.goto(`${env.server.url}/drills/${idleId}`);
    await page.getByRole("heading", { name: /Loops crossed/ }).waitFor();
    await expect(page.getByText(/a restart after the crossing failed/)).toBeTruthy();
    await expect.poll(() => page.locator("figure canvas").count(), { timeout: 60_000 }).toBeGreaterThan(0);
    await screenshot(page, "drill-debrief-crossed-desktop");

    await page.goto(`${env.server.url}/drills?trainee=user-tech-1`);
    await page.getByRole("heading", { name: "Drills" }).waitFor();
    expect(await page.getByText(/Luis Ferreira: power-blip at 600×/).count()).toBe(2);
    await screenshot(page, "drill-list-desktop");

    const phone = await env.browser.newContext({ viewport: viewports.phone });
    phone.setDefaultTimeout(180_000);
    const p2 = await phone.newPage();
    await signInAs(p2, env.server.url, "luis@tallgrass.example");
    await p2.goto(`${env.server.url}/drills/${idleId}`);
    await p2.getByRole("heading", { name: /Loops crossed/ }).waitFor();
    await screenshot(p2, "drill-debrief-crossed-phone");
    // Nothing wider than the phone (the timeline and score table wrap).
    const overflow = await p2.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
    expect(overflow).toBeLessThanOrEqual(0);
    expect(problems, problems.join("\n")).toEqual([]);
  });
});
