import { describe, expect, it } from "vitest";
import {
  hasChromium,
  useServerAndBrowser,
  screenshot,
  shownXRange,
  signInAs,
  viewports,
  watchConsole,
} from "../helpers/browser";
import { signIn } from "../helpers/server";

// The product's reason to exist, end to end: a simulated plant publishes over MQTT as a gateway,
// the rules see the loops heading for a crossover, and the warning reaches the on-call
// technician's board live; the building owner sees it read-only with the shared note.
const SITE = "millbrook-high";
const CROSSOVER_RULES = /crossover_risk|restart_race|loops_crossed/;

describe.skipIf(!hasChromium)("crossover warning from a simulated incident", () => {
  const env = useServerAndBrowser({ env: { LIFTLINE_SIMULATOR: "1" } });

  it("appears on the technician's board without a reload, is acknowledged with a shared note, and the owner sees it read-only", async () => {
    const tech = await env.browser.newContext({ viewport: viewports.phone });
    const page = await tech.newPage();
    const problems = watchConsole(page);
    await signInAs(page, env.server.url, "luis@tallgrass.example");
    const card = page.locator(`[data-testid=site-card][data-site=${SITE}]`);
    await card.waitFor();

    // An admin replays the power-blip incident on the school's plant at 120× (ends "now" in 90 s).
    const admin = await signIn(env.server.url, "admin@tallgrass.example");
    const start = await fetch(`${env.server.url}/api/simulator/${SITE}`, {
      method: "POST",
      headers: { cookie: admin.cookie!, origin: env.server.url, "content-type": "application/json" },
      body: JSON.stringify({ scenario: "power-blip", speed: 120 }),
    });
    expect(start.status).toBe(200);

    // The board updates live over socket.io: no reload in between.
    const worst = card.getByTestId("site-worst");
    await expect
      .poll(async () => (await worst.count()) && (await worst.getAttribute("data-rule")), {
        timeout: 120_000,
        interval: 1000,
      })
      .toMatch(CROSSOVER_RULES);
    await screenshot(page, "board-crossover-technician-phone");

    await card.click();
    await page.waitForURL(new RegExp(`/sites/${SITE}$`));
    // Whichever crossover warning leads: a chiller held by a latched trip is warned by restart_race first.
    const crossoverCards = (p: typeof page) =>
      p.locator(
        "[data-testid=alarm-card]:is([data-rule=crossover_risk], [data-rule=restart_race], [data-rule=loops_crossed])",
      );
    await crossoverCards(page).first().waitFor({ timeout: 30_000 });
    // Pin the card by its rule: the cards reorder as alarms change, and `.first()` would follow them.
    const rule = await crossoverCards(page).first().getAttribute("data-rule");
    const alarm = page.locator(`[data-testid=alarm-card][data-rule=${rule}]`).first();
    await expect.poll(() => alarm.getByTestId("caution").textContent()).toContain("qualified technicians");
    await screenshot(page, "site-crossover-technician-phone");
    // The margin sparkline's time axis is the last hour, however few values it has yet.
    const spark = page.locator("[data-testid=chiller-derived] [role=img] .uplot").first();
    expect((await shownXRange(spark)).spanS).toBe(3600);

    await alarm.getByRole("button", { name: "Add note" }).click();
    await alarm.getByLabel("Note", { exact: true }).fill("On my way; tower fan found in off, putting it back to auto.");
    await alarm.getByLabel("Shared with the building owner").check();
    await alarm.getByRole("button", { name: "Save note" }).click();
    await expect.poll(() => alarm.getByTestId("alarm-note").count(), { timeout: 10_000 }).toBe(1);

    const ackNote = alarm.getByPlaceholder("Note (optional): what you are doing");
    if (await ackNote.count()) {
      await ackNote.fill("Acknowledged from the road");
      await alarm.getByRole("button", { name: "Acknowledge" }).click();
    }
    await expect
      .poll(() => alarm.getAttribute("data-state"), { timeout: 15_000 })
      .toMatch(/acknowledged|normal|latched/);
    await screenshot(page, "site-crossover-acknowledged-phone");
    expect(problems.filter((p) => !p.includes("WebSocket"))).toEqual([]);
    await tech.close();

    // The owner: same warning in plain words, the shared note, no controls; the API refuses to act.
    const owner = await env.browser.newContext({ viewport: viewports.phone });
    const ownerPage = await owner.newPage();
    await signInAs(ownerPage, env.server.url, "facilities@millbrook.example");
    await ownerPage.goto(`${env.server.url}/sites/${SITE}`);
    const ownerAlarm = ownerPage.locator(`[data-testid=alarm-card][data-rule=${rule}]`).first();
    await ownerAlarm.waitFor({ timeout: 30_000 });
    await expect.poll(() => ownerAlarm.getByTestId("alarm-note").textContent()).toContain("tower fan found in off");
    expect(await ownerPage.getByRole("button", { name: /Acknowledge|Add note|Shelve/ }).count()).toBe(0);
    expect(await ownerAlarm.getByTestId("caution").count()).toBe(0);
    await screenshot(ownerPage, "site-crossover-owner-phone");

    const alarmId = (await ownerAlarm.getByRole("link").first().getAttribute("href"))!.split("/").pop();
    const refused = await ownerPage.evaluate(
      async (id) =>
        (
          await fetch(`/api/alarms/${id}/ack`, {
            method: "POST",
            headers: { "content-type": "application/json" },
            body: "{}",
          })
        ).status,
      alarmId,
    );
    expect(refused).toBe(403);
    await owner.close();

    // The technician opens the alarm: each reading it rests on, when raised beside now (live), at phone width in the dark.
    const again = await env.browser.newContext({ viewport: viewports.phone, colorScheme: "dark" });
    const alarmPage = await again.newPage();
    const alarmProblems = watchConsole(alarmPage);
    await signInAs(alarmPage, env.server.url, "luis@tallgrass.example");
    await alarmPage.goto(`${env.server.url}/alarms/${alarmId}`);
    const rows = alarmPage.getByTestId("then-now-reading");
    await rows.first().waitFor({ timeout: 15_000 });
    expect(await rows.count()).toBeGreaterThanOrEqual(2);
    await expect
      .poll(async () => (await rows.getByTestId("now-value").allTextContents()).every((t) => /\d/.test(t)), {
        timeout: 15_000,
      })
      .toBe(true);
    expect((await rows.getByTestId("raised-value").allTextContents()).some((t) => /\d/.test(t))).toBe(true);
    expect(await alarmPage.evaluate(() => document.documentElement.scrollWidth <= window.innerWidth)).toBe(true);
    await screenshot(alarmPage, "alarm-then-and-now-technician-phone-dark");
    expect(alarmProblems.filter((p) => !p.includes("WebSocket"))).toEqual([]);
    await again.close();
  }, 240_000);
});
