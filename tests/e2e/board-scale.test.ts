import type { Browser, Page } from "playwright-core";
import { io } from "socket.io-client";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { BoardSiteDto } from "@/lib/dto/board";
import path from "node:path";
import { hasChromium, launchBrowser, screenshot, SCREENSHOT_DIR, signInAs, viewports } from "../helpers/browser";
import { seedBoard, type SeededBoard } from "../helpers/board-seed";
import { adminCookie, api, connectGateway, provisionGateway, putPointMap } from "../helpers/mqtt";
import { serverMode, signIn, startServer, type TestServer } from "../helpers/server";

// The board with a contractor's portfolio: 500 plants (40 customers, three pieces of equipment
// each, a few alarms, temporary changes and service requests) written into the database before
// the server starts. Goals from the issue: the board's first render under 1 s on this machine,
// and live status pushes keep it current without fetching the whole list again. Both are timed
// here and printed; search, filter, sort, layout and the view in the URL are checked on it too.
const SITES = 500;
const CUSTOMERS = 40;
const TECH = "luis@tallgrass.example";
const DEMO_SITES = 3;

/** React has attached its handlers to the board's controls (typing before that would be lost). */
const hydrated = (page: Page) =>
  page.waitForFunction(() => {
    const el = document.querySelector("#board-search");
    // …and the whole list has arrived (the page carries only the first screenful).
    const complete = document.querySelector("[data-complete]") !== null;
    return complete && el !== null && Object.keys(el).some((k) => k.startsWith("__reactProps"));
  });

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

describe.skipIf(!hasChromium)("the board with 500 plants", { timeout: 600_000 }, () => {
  let seeded: SeededBoard;
  let server: TestServer;
  let browser: Browser;
  let page: Page;
  const figures: Record<string, string> = {};

  beforeAll(async () => {
    const t0 = performance.now();
    seeded = seedBoard({ sites: SITES, customers: CUSTOMERS });
    figures.seed = `${Math.round(performance.now() - t0)} ms to seed ${SITES} sites`;
    server = await startServer({ dataDir: seeded.dataDir });
    browser = await launchBrowser();
    const context = await browser.newContext({ viewport: viewports.desktop });
    page = await context.newPage();
    page.setDefaultTimeout(180_000);
    // Signing in lands on the board: in development mode this compiles it, before any clock runs.
    await signInAs(page, server.url, TECH);
    await page.getByTestId("site-card").first().waitFor();
  }, 600_000);

  afterAll(async () => {
    console.log(
      `\nBoard with ${SITES + DEMO_SITES} sites (${serverMode()} server):\n${Object.entries(figures)
        .map(([k, v]) => `  ${k}: ${v}`)
        .join("\n")}\n`,
    );
    await browser?.close();
    await server?.stop();
  });

  it("renders its first cards in under a second", async () => {
    const runs: Array<{ visibleMs: number; ttfbMs: number; fcpMs: number; loadMs: number }> = [];
    for (let i = 0; i < 5; i++) {
      const t0 = Date.now();
      await page.goto(`${server.url}/`, { waitUntil: "commit" });
      await page.getByTestId("site-card").first().waitFor({ state: "visible" });
      const visibleMs = Date.now() - t0;
      await page.waitForLoadState("load");
      const [ttfbMs, fcpMs, loadMs] = await page.evaluate(() => {
        const nav = performance.getEntriesByType("navigation")[0] as PerformanceNavigationTiming;
        const fcp = performance.getEntriesByName("first-contentful-paint")[0]?.startTime ?? -1;
        return [nav.responseStart, fcp, nav.loadEventEnd].map(Math.round);
      });
      runs.push({ visibleMs, ttfbMs, fcpMs, loadMs });
    }
    const med = (k: keyof (typeof runs)[number]) => median(runs.map((r) => r[k]));
    const visible = med("visibleMs");
    figures.firstRender =
      `median of 5: ${visible} ms navigation → first card visible (runs: ${runs.map((r) => r.visibleMs).join(", ")} ms); ` +
      `server's first byte ${med("ttfbMs")} ms, first contentful paint ${med("fcpMs")} ms, load event ${med("loadMs")} ms`;
    await screenshot(page, "board-500-desktop");
    // The goal is the product as it runs (a production build). A development server renders with
    // React's checks on and compiles on demand: there the figure is printed against a looser bound.
    expect(visible).toBeLessThan(serverMode() === "production" ? 1000 : 5000);
  });

  it("reaches every plant by scrolling down", async () => {
    const cards = page.getByTestId("site-card");
    await hydrated(page);
    await page.getByTestId("board-more").waitFor();
    expect(await cards.count()).toBeLessThan(SITES);
    const t0 = Date.now();
    while (await page.getByTestId("board-more").count()) {
      await page.mouse.wheel(0, 20_000);
      await page.waitForTimeout(100);
    }
    expect(await cards.count()).toBe(SITES + DEMO_SITES);
    figures.scrollAll = `${Date.now() - t0} ms to render all ${SITES + DEMO_SITES} cards by scrolling`;
  });

  it("joins the 500 board rooms in one quick ack", async () => {
    const { cookie } = await signIn(server.url, TECH);
    const socket = io(server.url, {
      extraHeaders: { cookie: cookie!, origin: server.url },
      transports: ["websocket"],
      reconnection: false,
    });
    await new Promise<void>((resolve, reject) => socket.once("connect", resolve).once("connect_error", reject));
    const times: number[] = [];
    let joined = 0;
    for (let i = 0; i < 5; i++) {
      const t0 = performance.now();
      const ack = await socket.emitWithAck("board:join");
      times.push(performance.now() - t0);
      if ("data" in ack) joined = ack.data.siteIds.length;
      await socket.emitWithAck("board:leave");
    }
    socket.disconnect();
    figures.boardJoin = `median ${median(times).toFixed(1)} ms for board:join of ${joined} rooms (5 runs)`;
    expect(joined).toBe(SITES + DEMO_SITES);
    // A join is one scoped id query and an in-memory room add per site (socket.io's in-memory adapter).
    expect(median(times)).toBeLessThan(250);
  });

  it("shows a new alarm on the right card from the status push, without fetching the list again", async () => {
    // A quiet seeded plant (no alarm, no change, no request) gets a gateway whose chiller reports a trip.
    const siteId = seeded.siteIds.find(
      (id) => !seeded.alarms.has(id) && !seeded.changes.has(id) && !seeded.requests.has(id),
    )!;
    const admin = await adminCookie(server);
    const gw = await provisionGateway(server, admin, { siteId });
    const csv =
      "gateway_point,equipment,quantity,unit\nALM,CH-1,chiller_alarm,bool\nFAULT,CH-1,fault_text,text\nRUN,CH-1,run_status,bool\n";
    const map = await putPointMap(server, admin, gw.gateway.id, csv);
    expect(map.status, JSON.stringify(map.body)).toBe(200);
    const client = await connectGateway(server, gw);
    await page.goto(`${server.url}/?q=${encodeURIComponent(siteId.replaceAll("-", " "))}`);
    const card = page.locator(`[data-testid=site-card][data-site=${siteId}]`);
    await card.waitFor();
    await hydrated(page);
    // Provisioning changes the site's data status; wait for the page to settle on it first.
    await page.waitForTimeout(3000);
    expect(await card.getByTestId("site-worst").count()).toBe(0);
    const listFetches: string[] = [];
    page.on("request", (r) => {
      if (/\/api\/(board|sites)(\?|$)/.test(new URL(r.url()).pathname + new URL(r.url()).search))
        listFetches.push(r.url());
    });
    // Two samples 10 s apart in event time: the rules evaluate every 5 s of event time.
    const tStart = Date.now() - 20_000;
    const t0 = Date.now();
    for (const [i, ts] of [tStart, tStart + 10_000].entries()) {
      const at = new Date(ts).toISOString();
      const readings = [
        { point: "ALM", value: true, ts: at },
        { point: "FAULT", value: "Motor winding high temperature", ts: at },
        { point: "RUN", value: false, ts: at },
      ];
      await client.publishAsync(
        `liftline/${gw.gateway.id}/readings`,
        JSON.stringify({ seq: i, sentAt: at, readings }),
        { qos: 1 },
      );
    }
    await card.locator("[data-testid=site-worst][data-rule=chiller_tripped]").waitFor({ timeout: 30_000 });
    const ms = Date.now() - t0;
    await client.endAsync();
    figures.liveUpdate = `${ms} ms from publishing a chiller trip (QoS 1) to the card showing it; ${listFetches.length} list fetches meanwhile`;
    expect(listFetches).toEqual([]);
    // The status round runs within 0.5 s of an alarm change (lib/server/realtime/live.ts); generous for a loaded machine.
    expect(ms).toBeLessThan(5000);
  });

  it("searches, filters by state with counts, sorts, switches to the list, and keeps the view in the URL", async () => {
    const board = (await api(server, (await signIn(server.url, TECH)).cookie!, "/api/board")).body
      .sites as BoardSiteDto[];
    await page.goto(`${server.url}/`);
    await page.getByTestId("site-card").first().waitFor();
    await hydrated(page);
    // Counts at the top match the seeded states (data is not live anywhere: no gateway reports).
    const count = async (state: string) => Number(await page.getByTestId(`board-count-${state}`).textContent());
    const alarmed = board.filter((s) => s.status.worst).length;
    expect(alarmed).toBeGreaterThanOrEqual(seeded.alarms.size);
    expect(await count("all")).toBe(SITES + DEMO_SITES);
    expect(await count("alarms")).toBe(alarmed);
    expect(await count("changes")).toBe(seeded.changes.size);
    expect(await count("stale")).toBe(board.filter((s) => s.status.data !== "live").length);
    // Urgency first: a priority-1 plant leads.
    const first = await page.getByTestId("site-card").first().getAttribute("data-site");
    expect(board.find((s) => s.id === first)?.status.worst?.priority).toBe(1);

    // Search by customer, then by site name words.
    await page.getByLabel("Search site or customer").fill("Portfolio Owner 007");
    const owner7 = board.filter((s) => s.customer.name === "Portfolio Owner 007").length;
    await expect.poll(() => page.getByTestId("site-card").count(), { timeout: 30_000 }).toBe(owner7);
    expect(page.url()).toContain("q=Portfolio+Owner+007");
    // Every word must appear in the site's or the customer's name ("012" also finds Portfolio Owner 012's plants).
    await page.getByLabel("Search site or customer").fill("plant 012 west");
    const words = ["plant", "012", "west"];
    const wanted = board.filter((s) => words.every((w) => `${s.name} ${s.customer.name}`.toLowerCase().includes(w)));
    expect(wanted.length).toBeGreaterThan(1);
    await expect.poll(() => page.getByTestId("site-card").count(), { timeout: 30_000 }).toBe(wanted.length);
    await page.getByLabel("Search site or customer").fill("");

    // Filter by keyboard: Tab into the state buttons and press Space on "Temporary changes".
    await page.getByTestId("board-filter-changes").focus();
    await page.keyboard.press("Space");
    await expect.poll(() => page.getByTestId("site-card").count(), { timeout: 30_000 }).toBe(seeded.changes.size);
    expect(await page.getByTestId("board-filter-changes").getAttribute("aria-pressed")).toBe("true");
    expect(await page.getByTestId("site-changes").count()).toBe(seeded.changes.size);

    // Sort by customer, list layout; the URL reproduces the view after a reload.
    await page.getByLabel("Sort").selectOption("customer");
    await page.getByTestId("board-layout-list").click();
    await expect.poll(() => page.getByTestId("site-row").count(), { timeout: 30_000 }).toBe(seeded.changes.size);
    const rows = await page.getByTestId("site-row").evaluateAll((els) => els.map((e) => e.getAttribute("data-site")));
    const expected = board
      .filter((s) => s.changes)
      .sort(
        (a, b) =>
          a.customer.name.localeCompare(b.customer.name, "en", { numeric: true }) ||
          a.name.localeCompare(b.name, "en", { numeric: true }),
      )
      .map((s) => s.id);
    expect(rows).toEqual(expected);
    expect(new URL(page.url()).search).toBe("?state=changes&sort=customer&view=list");
    await screenshot(page, "board-500-list-desktop");
    await page.reload();
    await expect.poll(() => page.getByTestId("site-row").count(), { timeout: 30_000 }).toBe(seeded.changes.size);
    expect(await page.getByTestId("board-filter-changes").getAttribute("aria-pressed")).toBe("true");
  });

  it("fits a 390-px phone in both layouts without sideways scrolling", async () => {
    const phone = await browser.newContext({ viewport: viewports.phone });
    const p = await phone.newPage();
    p.setDefaultTimeout(120_000);
    await signInAs(p, server.url, TECH);
    await p.getByTestId("site-card").first().waitFor();
    const overflow = () =>
      p.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
    expect(await overflow()).toBe(0);
    await screenshot(p, "board-500-phone");
    await p.screenshot({ path: path.join(SCREENSHOT_DIR, "board-500-phone-screen.png") });
    await p.goto(`${server.url}/?state=alarms&view=list`);
    await p.getByTestId("site-row").first().waitFor();
    expect(await overflow()).toBe(0);
    await screenshot(p, "board-500-list-phone");
    await p.screenshot({ path: path.join(SCREENSHOT_DIR, "board-500-list-phone-screen.png") });
    await phone.close();
  });
});
