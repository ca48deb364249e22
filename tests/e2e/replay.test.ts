import { afterAll, describe, expect, it } from "vitest";
import { openDb, type Db } from "@/db/client";
import { getLayout, pointMapCsv } from "@/simulator";
import { startSimulatedGateway, type SimulatedGateway } from "@/simulator/gateway-client";
import { hasChromium, screenshot, signInAs, useServerAndBrowser, viewports, watchConsole } from "../helpers/browser";
import { adminCookie, provisionGateway, putPointMap } from "../helpers/mqtt";
import { toSiteWallInput } from "@/lib/client/site-wall-time";

// The replay page on a recorded incident: the first hour of the power-blip scenario
// (simulator/scenarios/power-blip.ts: a blip at 10 min drops the tower fan drive into OFF and the
// chiller trips) runs at 600× through a simulated gateway; a technician replays that hour on a
// phone at 600×, pauses, and jumps from event to event. At each stop the page must list exactly the
// alarms the server's own alarm_events table says stood out of normal at that event time.

const SITE = "millbrook-high";
const RUN_S = 3600;
let sim: SimulatedGateway | undefined;
let db: Db | undefined;
afterAll(async () => {
  await sim?.stop();
  db?.$client.close();
});

/** Alarm keys out of normal at `atMs`, straight from the stored transitions (the reference). */
function standingInDb(atMs: number): string[] {
  const rows = db!.$client
    .prepare(
      `select a.key, e.to_state as state from alarm_events e join alarms a on a.id = e.alarm_id
        where e.id in (select max(id) from alarm_events where site_id = ? and event_at_ms <= ? group by alarm_id)`,
    )
    .all(SITE, atMs) as { key: string; state: string }[];
  return rows
    .filter((r) => r.state !== "normal")
    .map((r) => r.key)
    .sort();
}

describe.skipIf(!hasChromium)("replay page", () => {
  const env = useServerAndBrowser();

  it("plays a recorded hour at 600×, jumps to the next event and lists the alarms standing then", async () => {
    const { server } = env;
    const cookie = await adminCookie(server);
    const gw = await provisionGateway(server, cookie, { siteId: SITE });
    expect((await putPointMap(server, cookie, gw.gateway.id, pointMapCsv(getLayout("school")!))).status).toBe(200);
    const fromMs = Date.now() - RUN_S * 1000;
    const toMs = fromMs + RUN_S * 1000;
    sim = startSimulatedGateway({
      mqttUrl: server.mqttUrl,
      username: gw.username,
      password: gw.password,
      siteLayout: "school",
      scenario: "power-blip",
      durationS: RUN_S,
      speed: 600,
      seed: 7,
      startMs: fromMs,
      log: () => {},
    });
    db = openDb(server.databasePath);
    // 6 s of wall time at 600×; then the last evaluations settle and are saved.
    const newest = () =>
      (
        db!.$client
          .prepare(
            `select max(r.ts) as ts from readings r join points p on p.id = r.point_id
               join equipment e on e.id = p.equipment_id where e.site_id = ?`,
          )
          .get(SITE) as { ts: number | null }
      ).ts ?? 0;
    await expect.poll(newest, { timeout: 60_000, interval: 1000 }).toBeGreaterThanOrEqual(toMs - 10_000);
    await new Promise((r) => setTimeout(r, 3000));
    expect(standingInDb(toMs).length, "the run raised alarms").toBeGreaterThan(0);

    const context = await env.browser.newContext({ viewport: viewports.phone });
    const page = await context.newPage();
    const problems = watchConsole(page);
    // A development-mode server compiles each page on its first request (slow on a shared machine).
    page.setDefaultTimeout(120_000);
    page.setDefaultNavigationTimeout(120_000);
    await signInAs(page, server.url, "luis@tallgrass.example");
    // The site page links to replay.
    await page.goto(`${server.url}/sites/${SITE}`);
    await page.getByTestId("replay-link").click();
    await page.waitForURL(/\/replay$/);

    await page.goto(`${server.url}/sites/${SITE}/replay?from=${fromMs}&to=${toMs}`);
    await expect.poll(() => page.getByText("Replay — not live").isVisible()).toBe(true);
    const clock = page.getByTestId("replay-clock");
    const atMs = async () => Number(await clock.getAttribute("data-at-ms"));
    await page.locator("[data-testid=chiller-derived]").first().waitFor({ timeout: 60_000 });
    expect(await atMs()).toBe(fromMs);
    await screenshot(page, "replay-start-phone");

    // Play at 600×: 10 simulated minutes a second.
    await page.getByTestId("replay-speed-600").click();
    await page.getByTestId("replay-play").click();
    await expect.poll(atMs, { timeout: 10_000 }).toBeGreaterThan(fromMs + 5 * 60_000);
    await page.getByTestId("replay-play").click(); // Pause
    const pausedAt = await atMs();
    await new Promise((r) => setTimeout(r, 600));
    expect(await atMs(), "paused: the clock stands").toBe(pausedAt);

    // Jump from event to event (by keyboard) until an alarm stands; at every stop the list matches the database.
    const next = page.getByTestId("replay-next-event");
    let shown: string[] = [];
    for (let i = 0; i < 40; i++) {
      const before = await atMs();
      await next.focus();
      await page.keyboard.press("Enter");
      await expect.poll(atMs).toBeGreaterThan(before);
      const at = await atMs();
      const stored = db.$client
        .prepare("select count(*) as n from alarm_events where site_id = ? and event_at_ms = ?")
        .get(SITE, at) as { n: number };
      expect(stored.n, "the next event is a recorded transition").toBeGreaterThan(0);
      const rows = page.getByTestId("replay-alarm");
      await expect.poll(async () => rows.count()).toBe(standingInDb(at).length);
      shown = (await rows.evaluateAll((els) => els.map((e) => e.getAttribute("data-key") ?? ""))).sort();
      expect(shown).toEqual(standingInDb(at));
      if (shown.some((k) => k.startsWith("chiller_tripped:"))) break;
    }
    expect(
      shown.some((k) => k.startsWith("chiller_tripped:")),
      "the trip after the blip was reached",
    ).toBe(true);
    await screenshot(page, "replay-next-event-phone");

    // No sideways scrolling on a 390 px phone.
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
    await page.setViewportSize(viewports.desktop);
    await screenshot(page, "replay-next-event-desktop");
    expect(problems).toEqual([]);
    await context.close();

    // A phone set to Tokyo time picks a window: "From" reads and is read on the site's clock (New York).
    const away = await env.browser.newContext({ viewport: viewports.phone, timezoneId: "Asia/Tokyo" });
    const awayPage = await away.newPage();
    awayPage.setDefaultTimeout(120_000);
    await signInAs(awayPage, server.url, "luis@tallgrass.example");
    await awayPage.goto(`${server.url}/sites/${SITE}/replay?from=${fromMs}&to=${toMs}`);
    const from = awayPage.getByLabel("From (site time)");
    await expect.poll(() => from.inputValue()).toBe(toSiteWallInput(fromMs, "America/New_York"));
    await from.fill("2026-07-01T14:00");
    await awayPage.getByRole("button", { name: "Replay this window" }).click();
    // 14:00 EDT is 18:00 UTC (IANA rules for America/New_York).
    await awayPage.waitForURL(new RegExp(`from=${Date.UTC(2026, 6, 1, 18, 0)}&`));
    await away.close();
  }, 480_000);
});
