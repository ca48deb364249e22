import fs from "node:fs";
import path from "node:path";
import type { Browser, Page } from "playwright-core";
import { wcagContrast } from "culori";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { hasChromium, launchBrowser, screenshot, signInAs, viewports } from "../helpers/browser";
import { adminCookie, api, raiseChillerTrip, waitFor } from "../helpers/mqtt";
import { ROOT, startServer, type TestServer } from "../helpers/server";

// axe-core (Deque's rules engine, WCAG 2.2 A/AA tags plus best practices) on every page of the app,
// signed in as each role, at desktop and 390-px phone width, in the light and the dark theme. The
// test fails on any violation axe rates serious or critical, after printing them all. Pages a role
// may not reach (a 404 or a redirect away) are skipped for that role; every app/**/page.tsx must be
// named by one URL below, so a new page is not silently left out.

const SITE = "harborview-mob";
const ROLES = [
  { role: "admin", email: "admin@tallgrass.example" },
  { role: "technician", email: "luis@tallgrass.example" },
  { role: "customer", email: "facilities@harborview.example" },
] as const;
const AXE_SOURCE = fs.readFileSync(path.join(ROOT, "node_modules", "axe-core", "axe.min.js"), "utf8");

interface Violation {
  id: string;
  impact: string | null;
  help: string;
  nodes: Array<{ target: unknown[]; failureSummary?: string }>;
}

/** Every page.tsx as a pattern of the URLs it serves (route groups dropped, `[param]` one path segment). */
function pagePatterns(): Array<{ file: string; re: RegExp }> {
  const out: Array<{ file: string; re: RegExp }> = [];
  const walk = (dir: string) => {
    for (const e of fs.readdirSync(dir, { withFileTypes: true })) {
      const full = path.join(dir, e.name);
      if (e.isDirectory()) {
        if (e.name !== "api") walk(full);
      } else if (e.name === "page.tsx") {
        const segments = path
          .relative(path.join(ROOT, "app"), dir)
          .split(path.sep)
          .filter((s) => s && !/^\(.*\)$/.test(s))
          .map((s) => (/^\[.*\]$/.test(s) ? "[^/]+" : s.replace(/[.*+?^${}()|\\]/g, "\\$&")));
        out.push({ file: path.relative(ROOT, full), re: new RegExp(`^/${segments.join("/")}$`) });
      }
    }
  };
  walk(path.join(ROOT, "app"));
  return out;
}

async function runAxe(page: Page): Promise<Violation[]> {
  const loaded = await page.evaluate(() => "axe" in window);
  if (!loaded) await page.evaluate(AXE_SOURCE);
  return page.evaluate(async () => {
    // eslint-disable-next-line @typescript-eslint/no-explicit-any -- axe is injected at run time
    const axe = (window as any).axe;
    // The development server's own indicator (a <nextjs-portal> overlay) is not the app: a production build has none.
    const r = await axe.run(
      { exclude: [["nextjs-portal"]] },
      {
        runOnly: { type: "tag", values: ["wcag2a", "wcag2aa", "wcag21a", "wcag21aa", "wcag22aa", "best-practice"] },
        resultTypes: ["violations"],
      },
    );
    return r.violations as Violation[];
  });
}

async function setTheme(page: Page, theme: "light" | "dark") {
  await page.evaluate((t) => (document.documentElement.dataset.theme = t), theme);
}

describe.skipIf(!hasChromium)(
  "accessibility: axe-core on every page, role, width and theme",
  { timeout: 2_400_000 },
  () => {
    let server: TestServer;
    let browser: Browser;
    const urls: string[] = [];
    const anonymousUrls = [
      "/sign-in",
      "/forgot-password",
      "/ack/not-a-token",
      "/invite/not-a-token",
      "/reset-password/not-a-token",
    ];
    const serious: string[] = [];

    beforeAll(async () => {
      server = await startServer();
      browser = await launchBrowser();
      const cookie = await adminCookie(server);
      // Ids from the demo data, and an alarm (through a gateway) so its page and a point's trend exist.
      const alarmId = await raiseChillerTrip(server, cookie, SITE, "CH-1", "High condenser pressure");
      const equipment = (await api(server, cookie, `/api/sites/${SITE}/equipment`)).body.equipment as Array<{
        id: string;
        tag: string;
      }>;
      const chiller = equipment.find((e) => e.tag === "CH-1")!;
      const points = (await api(server, cookie, `/api/equipment/${chiller.id}/points`)).body.points as Array<{
        id: number;
      }>;
      const visit = await api(server, cookie, "/api/visits", {
        method: "POST",
        headers: { "content-type": "application/json" },
        body: JSON.stringify({ alarmId, mode: "remote" }),
      });
      expect(visit.status).toBe(201);
      // The trip files an incident; a drill on a training site (stopped at once) gives a debrief page.
      const incidents = await waitFor(async () => {
        const list = (await api(server, cookie, `/api/incidents?site=${SITE}`)).body.incidents as
          Array<{ id: string }> | undefined;
        return list?.length ? list : undefined;
      }, 30_000);
      const post = (url: string, body: unknown) =>
        api(server, cookie, url, {
          method: "POST",
          headers: { "content-type": "application/json" },
          body: JSON.stringify(body),
        });
      const training = await post("/api/training-sites", { name: "Axe training plant", layout: "default" });
      expect(training.status, JSON.stringify(training.body)).toBe(201);
      const drill = await post("/api/drills", {
        siteId: training.body.site.id,
        traineeId: "user-tech-1",
        scenario: "power-blip",
        speed: 60,
        hints: true,
      });
      expect(drill.status, JSON.stringify(drill.body)).toBe(201);
      const drillId = drill.body.drill.id as string;
      await api(server, cookie, `/api/drills/${drillId}/stop`, { method: "POST" });
      urls.push(
        "/incidents",
        `/incidents/${incidents[0].id}`,
        "/drills",
        `/drills/${drillId}`,
        `/sites/${SITE}/replay`,
        `/sites/${SITE}/equipment/${chiller.id}`,
        "/",
        "/alarms",
        `/alarms/${alarmId}`,
        "/api-docs",
        "/on-call",
        "/settings",
        "/settings/tokens",
        "/admin",
        "/admin/alarm-health",
        "/admin/audit",
        "/admin/customers",
        "/admin/customers/org-harborview",
        "/admin/escalation",
        "/admin/gateways",
        "/admin/outbox",
        "/admin/people",
        "/admin/setup",
        "/admin/simulator",
        "/admin/texts",
        `/sites/${SITE}`,
        `/sites/${SITE}/equipment/${chiller.id}/refrigerant`,
        `/sites/${SITE}/gateways`,
        `/sites/${SITE}/points/${points[0].id}`,
        `/sites/${SITE}/points/import`,
        `/sites/${SITE}/rules`,
        `/sites/${SITE}/setup`,
        `/sites/${SITE}/setup/${chiller.id}`,
        `/visits/${(visit.body as { visit: { id: string } }).visit.id}`,
      );
    }, 600_000);
    afterAll(async () => {
      if (serious.length) console.log(`\nSerious or critical axe violations:\n${serious.join("\n")}\n`);
      await browser?.close();
      await server?.stop();
    });

    it("names every page of the app", () => {
      const all = [...urls, ...anonymousUrls];
      const missing = pagePatterns().filter((p) => !all.some((u) => p.re.test(u)));
      expect(missing.map((m) => m.file)).toEqual([]);
    });

    /** Loads `url`, then runs axe at both widths in both themes; returns whether the page was reachable. */
    async function check(page: Page, who: string, url: string): Promise<boolean> {
      const res = await page.goto(`${server.url}${url}`, { waitUntil: "load" });
      const landed = new URL(page.url()).pathname;
      if (!res || res.status() >= 400 || landed !== url) return false;
      await page.waitForTimeout(400);
      for (const [width, size] of Object.entries(viewports)) {
        await page.setViewportSize(size);
        for (const theme of ["light", "dark"] as const) {
          await setTheme(page, theme);
          const found = (await runAxe(page)).filter((v) => v.impact === "serious" || v.impact === "critical");
          for (const v of found)
            serious.push(
              `${who} ${url} ${width} ${theme}: [${v.impact}] ${v.id} — ${v.help}\n` +
                v.nodes
                  .slice(0, 5)
                  .map(
                    (n) =>
                      `    ${JSON.stringify(n.target)} ${n.failureSummary?.split("\n").slice(0, 3).join(" ") ?? ""}`,
                  )
                  .join("\n"),
            );
          // Printed as found too: the run is long, and the list is also printed whole at the end.
          for (const line of serious.slice(serious.length - found.length)) console.log(line);
          if (found.length)
            await screenshot(page, `axe-${who}-${url.replaceAll("/", "_") || "board"}-${width}-${theme}`);
        }
      }
      return true;
    }

    it("signed out: the sign-in, password and link pages", async () => {
      const context = await browser.newContext({ bypassCSP: true, viewport: viewports.desktop });
      const page = await context.newPage();
      page.setDefaultTimeout(120_000);
      for (const url of anonymousUrls) expect(await check(page, "anonymous", url)).toBe(true);
      await context.close();
      expect(serious.filter((s) => s.startsWith("anonymous"))).toEqual([]);
    });

    it.each(ROLES)("signed in as $role: every page the role can reach", async ({ role, email }) => {
      // bypassCSP lets the test inject axe's script; the app's own scripts run as in production.
      const context = await browser.newContext({ bypassCSP: true, viewport: viewports.desktop });
      const page = await context.newPage();
      page.setDefaultTimeout(120_000);
      await signInAs(page, server.url, email);
      const reached: string[] = [];
      for (const url of urls) if (await check(page, role, url)) reached.push(url);
      console.log(`${role}: axe ran on ${reached.length} pages × 2 widths × 2 themes: ${reached.join(" ")}`);
      // Each role reaches at least the board, the alarms, a site and its trend, and settings.
      expect(reached).toEqual(expect.arrayContaining(["/", "/alarms", `/sites/${SITE}`, "/settings"]));
      if (role === "admin") expect(reached.length).toBe(urls.length);
      await context.close();
      expect(serious.filter((s) => s.startsWith(role))).toEqual([]);
    });

    it("text fields show their border at 3:1 or more against the panel, light and dark (SC 1.4.11)", async () => {
      for (const colorScheme of ["light", "dark"] as const) {
        const context = await browser.newContext({ viewport: viewports.phone, colorScheme });
        const page = await context.newPage();
        await page.goto(`${server.url}/sign-in`);
        const field = page.getByLabel("E-mail");
        await field.waitFor();
        const [border, behind] = await field.evaluate((el) => {
          const panel = (node: Element | null): string => {
            for (let n = node; n; n = n.parentElement) {
              const bg = getComputedStyle(n).backgroundColor;
              if (bg && bg !== "rgba(0, 0, 0, 0)" && bg !== "transparent") return bg;
            }
            return "rgb(255, 255, 255)";
          };
          return [getComputedStyle(el).borderTopColor, panel(el.parentElement)];
        });
        // culori's WCAG 2.2 contrast ratio of the computed colours.
        expect(wcagContrast(border, behind), `${colorScheme}: ${border} on ${behind}`).toBeGreaterThanOrEqual(3);
        await context.close();
      }
    });

    it("the server renders the remembered theme: a dark cookie gives a dark first paint", async () => {
      const context = await browser.newContext({ viewport: viewports.phone });
      await context.addCookies([{ name: "liftline-theme", value: "dark", url: server.url }]);
      const page = await context.newPage();
      const html = await (await page.request.get(`${server.url}/sign-in`)).text();
      expect(html).toMatch(/<html[^>]*data-theme="dark"/);
      await page.goto(`${server.url}/sign-in`);
      const bg = await page.evaluate(() => getComputedStyle(document.body).backgroundColor);
      // --color-surface in the dark theme, #121417 (app/globals.css).
      expect(bg).toBe("rgb(18, 20, 23)");
      await context.close();
    });
  },
);
