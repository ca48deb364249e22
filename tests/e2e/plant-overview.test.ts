import { describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import fs from "node:fs";
import path from "node:path";
import {
  SCREENSHOT_DIR,
  hasChromium,
  screenshot,
  signInAs,
  useServerAndBrowser,
  viewports,
  watchConsole,
} from "../helpers/browser";
import { signIn } from "../helpers/server";
import { DEMO_SITES } from "@/db/seed/demo";
import { quantities } from "@/lib/quantities";

// The plant overview on every demo site's layout, on a desktop and a 390-px phone, light and dark,
// fed by the simulated gateways: no two labels of the drawing overlap (the SVG text elements'
// bounding boxes as Chromium lays them out), the phone page never scrolls sideways (WCAG 2.2
// SC 1.4.10 Reflow: content at 320 CSS px without two-dimensional scrolling; 390 px is the phone
// checked here), values link to their trends, and a customer's page carries no point key or Brick class.

/** Overlapping pairs among the visible drawing's text boxes, and texts outside the drawing. */
async function textProblems(page: Page): Promise<{ texts: number; overlaps: string[]; outside: string[] }> {
  return page.evaluate(() => {
    const svg = [...document.querySelectorAll<SVGSVGElement>("[data-testid=plant-overview-svg]")].find(
      (s) => s.getBoundingClientRect().width > 0,
    );
    if (!svg) return { texts: 0, overlaps: ["no visible drawing"], outside: [] };
    const box = svg.getBoundingClientRect();
    const texts = [...svg.querySelectorAll("text")]
      .map((t) => ({ text: t.textContent ?? "", r: t.getBoundingClientRect() }))
      .filter((t) => t.r.width > 0 && t.text.trim() !== "");
    const overlaps: string[] = [];
    const outside: string[] = [];
    const eps = 0.5;
    for (let i = 0; i < texts.length; i++) {
      const a = texts[i].r;
      if (a.left < box.left - eps || a.right > box.right + eps || a.top < box.top - eps || a.bottom > box.bottom + eps)
        outside.push(texts[i].text);
      for (let j = i + 1; j < texts.length; j++) {
        const b = texts[j].r;
        const x = Math.min(a.right, b.right) - Math.max(a.left, b.left);
        const y = Math.min(a.bottom, b.bottom) - Math.max(a.top, b.top);
        if (x > eps && y > eps) overlaps.push(`"${texts[i].text}" × "${texts[j].text}"`);
      }
    }
    return { texts: texts.length, overlaps, outside };
  });
}

describe.skipIf(!hasChromium)("plant overview drawing", { timeout: 600_000 }, () => {
  const env = useServerAndBrowser({ env: { LIFTLINE_SIMULATOR: "1" } });

  it("compiles the site page before the clocks run (a development-mode server builds a page on first request)", async () => {
    const { cookie } = await signIn(env.server.url, "luis@tallgrass.example");
    const res = await fetch(`${env.server.url}/sites/harborview-mob`, { headers: { cookie: cookie! } });
    expect(res.status).toBe(200);
  });

  for (const site of DEMO_SITES)
    it(`${site.id}: desktop and phone, light and dark — no overlapping labels, no sideways scroll, live values`, async () => {
      const chillers = site.equipment.filter((e) => e.kind === "chiller").length;
      for (const [width, viewport] of Object.entries(viewports))
        for (const scheme of ["light", "dark"] as const) {
          const context = await env.browser.newContext({ viewport, colorScheme: scheme });
          const page = await context.newPage();
          page.setDefaultTimeout(120_000);
          const problems = watchConsole(page);
          await signInAs(page, env.server.url, "luis@tallgrass.example");
          await page.goto(`${env.server.url}/sites/${site.id}`);
          await page.emulateMedia({ colorScheme: scheme });
          const drawing = page.locator(
            `[data-testid=plant-overview-svg][data-variant=${width === "phone" ? "narrow" : "wide"}]`,
          );
          await drawing.waitFor();
          // The simulated gateway's values arrive: at least the chillers' four water temperatures each.
          await expect
            .poll(
              () =>
                drawing
                  .getByTestId("overview-value-text")
                  .evaluateAll((els) => els.filter((e) => e.textContent !== "no data").length),
              { timeout: 90_000 },
            )
            .toBeGreaterThanOrEqual(4 * chillers);
          expect(await drawing.getByTestId("overview-chiller").count()).toBe(chillers);
          expect(await drawing.locator("[data-testid=overview-state]").count()).toBeGreaterThanOrEqual(
            3 * chillers + 1,
          );
          const t = await textProblems(page);
          expect(t.overlaps).toEqual([]);
          expect(t.outside).toEqual([]);
          expect(t.texts).toBeGreaterThan(10);
          if (width === "phone") {
            const sideways = await page.evaluate(
              () => document.documentElement.scrollWidth - document.documentElement.clientWidth,
            );
            expect(sideways).toBeLessThanOrEqual(0);
          }
          await page
            .getByTestId("plant-overview")
            .screenshot({ path: shotPath(`overview-${site.id}-${width}-${scheme}`) });
          if (scheme === "light") await screenshot(page, `site-page-${site.id}-${width}`);
          expect(problems.filter((p) => !p.includes("WebSocket"))).toEqual([]);
          await context.close();
        }
    });

  it("tapping a value opens its trend", async () => {
    const context = await env.browser.newContext({ viewport: viewports.phone });
    const page = await context.newPage();
    page.setDefaultTimeout(120_000);
    await signInAs(page, env.server.url, "luis@tallgrass.example");
    await page.goto(`${env.server.url}/sites/harborview-mob`);
    const link = page
      .locator("[data-testid=plant-overview-svg][data-variant=narrow] [data-testid=overview-value]")
      .first();
    const href = await link.getAttribute("href");
    expect(href).toMatch(/^\/sites\/harborview-mob\/points\/\d+$/);
    await link.click();
    await page.waitForURL(`${env.server.url}${href}`);
    await context.close();
  });

  it("a customer's site page shows no Brick class and no point key; a technician's shows them behind the toggle", async () => {
    // Single-word classes ("Alarm", "Status") are ordinary words on any page: the compound ones identify.
    const brickClasses = [...new Set(Object.values(quantities).map((q) => q.brickClass))].filter((b) =>
      b.includes("_"),
    );
    const keys = Object.keys(quantities).filter((k) => k.includes("_"));
    expect(brickClasses.length).toBeGreaterThan(20);
    expect(keys.length).toBeGreaterThan(30);
    const site = DEMO_SITES.find((s) => s.id === "harborview-mob")!;
    const { cookie } = await signIn(env.server.url, site.customer.userEmail);
    // The server's HTML, with the data the page hands its client components.
    const html = await (await fetch(`${env.server.url}/sites/${site.id}`, { headers: { cookie: cookie! } })).text();
    expect(html).toContain("Plant overview");
    expect(brickClasses.filter((b) => html.includes(b))).toEqual([]);
    expect(keys.filter((k) => html.includes(k))).toEqual([]);
    expect(html).not.toMatch(/Brick/i);

    const context = await env.browser.newContext({ viewport: viewports.desktop });
    const page = await context.newPage();
    page.setDefaultTimeout(120_000);
    await signInAs(page, env.server.url, site.customer.userEmail);
    await page.goto(`${env.server.url}/sites/${site.id}`);
    await page.locator("[data-testid=point-row]").first().waitFor();
    const dom = await page.evaluate(() => document.documentElement.outerHTML);
    expect(brickClasses.filter((b) => dom.includes(b))).toEqual([]);
    expect(keys.filter((k) => dom.includes(k))).toEqual([]);
    expect(await page.getByTestId("identifiers-toggle").count()).toBe(0);
    await context.close();

    const tech = await env.browser.newContext({ viewport: viewports.desktop });
    const techPage = await tech.newPage();
    techPage.setDefaultTimeout(120_000);
    await signInAs(techPage, env.server.url, "luis@tallgrass.example");
    await techPage.goto(`${env.server.url}/sites/${site.id}`);
    const ids = techPage.getByTestId("point-identifiers");
    expect(await ids.count()).toBe(0);
    await techPage.getByTestId("identifiers-toggle").check();
    await expect.poll(() => ids.first().textContent()).toMatch(/^[a-z_]+ · [A-Za-z_]+$/);
    await tech.close();
  });

  it("the phone page starts with equipment collapsed and reaches each section from its in-page navigation", async () => {
    const context = await env.browser.newContext({ viewport: viewports.phone });
    const page = await context.newPage();
    page.setDefaultTimeout(120_000);
    await signInAs(page, env.server.url, "luis@tallgrass.example");
    await page.goto(`${env.server.url}/sites/quarry-ridge-dh2`);
    const sections = page.getByTestId("equipment");
    await sections.first().waitFor();
    expect(await sections.evaluateAll((els) => els.filter((e) => (e as HTMLDetailsElement).open).length)).toBe(0);
    const nav = page.getByRole("navigation", { name: "On this page" });
    for (const name of ["Overview", "Alarms", "Numbers", "Equipment", "Files"]) {
      await nav.getByRole("link", { name }).click();
      const id = (await nav.getByRole("link", { name }).getAttribute("href"))!.slice(1);
      // The section comes into view (the last ones sit at the page's end, so not always at its top).
      await expect
        .poll(() =>
          page.evaluate((i) => {
            const top = document.getElementById(i)!.getBoundingClientRect().top;
            return top >= -1 && top < window.innerHeight - 40;
          }, id),
        )
        .toBe(true);
      expect(new URL(page.url()).hash).toBe(`#${id}`);
    }
    await context.close();
  });
});

function shotPath(name: string): string {
  fs.mkdirSync(SCREENSHOT_DIR, { recursive: true });
  return path.join(SCREENSHOT_DIR, `${name}.png`);
}
