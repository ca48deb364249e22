import fs from "node:fs";
import path from "node:path";
import { chromium, type Browser, type Locator, type Page } from "playwright-core";
import { afterAll, beforeAll } from "vitest";
import { DEMO_PASSWORD, ROOT, startServer, type StartOptions, type TestServer } from "./server";

// Browser tests drive Debian's Chromium through playwright-core (no browser download).
export const CHROMIUM_PATH = process.env.CHROMIUM_PATH ?? "/usr/bin/chromium";
export const hasChromium = fs.existsSync(CHROMIUM_PATH);
if (!hasChromium) {
  console.warn(
    `\n!!! Browser tests SKIPPED: no Chromium at ${CHROMIUM_PATH}. Install it (apt-get install -y chromium) — CI does. !!!\n`,
  );
}

export const SCREENSHOT_DIR = path.join(ROOT, "test-results", "screenshots");
export const viewports = { desktop: { width: 1280, height: 800 }, phone: { width: 390, height: 844 } } as const;

export async function launchBrowser(): Promise<Browser> {
  return chromium.launch({
    executablePath: CHROMIUM_PATH,
    headless: true,
    // This machine has no outside network: keep Chromium from trying to reach it.
    args: [
      "--no-sandbox",
      "--disable-gpu",
      "--disable-quic",
      "--no-first-run",
      "--disable-background-networking",
      "--disable-component-update",
      "--disable-sync",
    ],
  });
}

/** Collects console errors and failed requests so a test can assert a clean page. */
export function watchConsole(page: Page): string[] {
  const problems: string[] = [];
  page.on("console", (msg) => {
    if (msg.type() === "error") problems.push(`console: ${msg.text()}`);
  });
  page.on("pageerror", (err) => problems.push(`pageerror: ${err.message}`));
  // The console names no URL for a failed resource: the response does. Pages a test opens on purpose
  // (a 404 for another organization's site) are documents, checked by their status where they are opened.
  page.on("response", (res) => {
    if (res.status() >= 400 && res.request().resourceType() !== "document")
      problems.push(`response ${res.status()}: ${res.url()}`);
  });
  return problems;
}

export async function signInAs(page: Page, baseUrl: string, email: string, password = DEMO_PASSWORD): Promise<void> {
  await page.goto(`${baseUrl}/sign-in`);
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill(password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL(`${baseUrl}/`);
}

/** The time span (Unix seconds) a uPlot chart shows, as components/charts/uplot-options.ts exposes it. */
export async function shownXRange(chart: Locator): Promise<{ min: number; max: number; spanS: number }> {
  const [min, max] = ((await chart.getAttribute("data-x-range")) ?? "0,0").split(",").map(Number);
  return { min, max, spanS: max - min };
}

export async function screenshot(page: Page, name: string): Promise<string> {
  fs.mkdirSync(SCREENSHOT_DIR, { recursive: true });
  const file = path.join(SCREENSHOT_DIR, `${name}.png`);
  // Hiding the caret writes inline styles on inputs, which breaks hydration of a page still hydrating.
  await page.screenshot({ path: file, fullPage: true, caret: "initial" });
  return file;
}

/**
 * Starts a server and a browser for the enclosing describe block and stops both after it.
 * Call inside `describe`; read `env.server` / `env.browser` inside tests.
 */
export function useServerAndBrowser(opts: StartOptions = {}): { server: TestServer; browser: Browser } {
  const env = {} as { server: TestServer; browser: Browser };
  beforeAll(async () => {
    env.server = await startServer(opts);
    env.browser = await launchBrowser();
  });
  afterAll(async () => {
    await env.browser?.close();
    await env.server?.stop();
  });
  return env;
}
