import Database from "better-sqlite3";
import sharp from "sharp";
import { beforeAll, describe, expect, it } from "vitest";
import { hasChromium, screenshot, signInAs, useServerAndBrowser, viewports, watchConsole } from "../helpers/browser";
import { signIn } from "../helpers/server";

// A technician at phone width: adds a photo from the site page (the camera input takes a file
// here), shares it, then records refrigerant on a chiller's log and reads the leak rate.

/** The first request of each API route compiles it on a development server. */
const wait = { timeout: 30_000, interval: 200 };

describe.skipIf(!hasChromium)("photos and the refrigerant log in Chromium (phone)", () => {
  const env = useServerAndBrowser();

  // A development server compiles each page on its first request; ask for them once beforehand so
  // the browser's steps are timed on serving, not compiling.
  beforeAll(async () => {
    const { cookie } = await signIn(env.server.url, "luis@tallgrass.example");
    const d = new Database(env.server.databasePath, { readonly: true });
    const chiller = d.prepare("select id from equipment where site_id = 'harborview-mob' and tag = 'CH-1'").get() as {
      id: string;
    };
    d.close();
    const pages = [
      "/sign-in",
      "/",
      "/sites/harborview-mob",
      `/sites/harborview-mob/equipment/${encodeURIComponent(chiller.id)}/refrigerant`,
      "/api/sites/harborview-mob/files",
      "/api/files/none",
      "/api/files/none/thumbnail",
      `/api/equipment/${encodeURIComponent(chiller.id)}/refrigerant`,
    ];
    for (const page of pages) await fetch(env.server.url + page, { headers: { cookie: cookie! } });
  }, 240_000);

  it("uploads a photo, shares it, and records a full charge and a top-up", async () => {
    const context = await env.browser.newContext({ viewport: viewports.phone });
    const page = await context.newPage();
    const problems = watchConsole(page);
    await signInAs(page, env.server.url, "luis@tallgrass.example");
    await page.goto(`${env.server.url}/sites/harborview-mob`);

    const photo = await sharp({ create: { width: 400, height: 300, channels: 3, background: "#468" } })
      .jpeg()
      .toBuffer();
    await page.getByLabel("Caption (optional)").fill("Condenser water strainer");
    await page
      .getByLabel("Take a photo or choose a file")
      .setInputFiles({ name: "strainer.jpg", mimeType: "image/jpeg", buffer: photo });
    const grid = page.getByTestId("files-grid");
    await expect.poll(() => grid.getByRole("img", { name: "Condenser water strainer" }).count(), wait).toBe(1);
    // The thumbnail loaded (not a broken image): 320 px wide from a 400 px photo.
    await expect
      .poll(
        () =>
          grid
            .getByRole("img")
            .first()
            .evaluate((img: HTMLImageElement) => img.naturalWidth),
        wait,
      )
      .toBe(320);
    const share = grid.getByLabel("Shared with the customer");
    await share.click();
    await expect.poll(() => share.isChecked(), wait).toBe(true);
    await page.reload();
    await expect
      .poll(() => page.getByTestId("files-grid").getByLabel("Shared with the customer").isChecked(), wait)
      .toBe(true);
    await screenshot(page, "site-files-technician-phone");

    await page.getByRole("link", { name: "Refrigerant log CH-1" }).click();
    await page.waitForURL(/\/refrigerant$/);
    // The technician's unit system is IP: amounts in lb. 500 lb full charge, then 10 lb 60 days on:
    // (10/500) × (365/60) × 100 = 12.2 %/yr (40 CFR §82.152 annualizing method, recalled).
    await page.getByLabel("What").selectOption("full_charge");
    await page.getByLabel("Amount (lb)").fill("500");
    await page.getByLabel("When (empty: now)").fill("2024-01-01T12:00");
    await page.getByLabel("Reason").fill("Recharged after tube repair");
    await page.getByRole("button", { name: "Add to the log" }).click();
    await expect.poll(() => page.getByTestId("refrigerant-entry").count(), wait).toBe(1);

    await page.getByLabel("What").selectOption("added");
    await page.getByLabel("Amount (lb)").fill("10");
    await page.getByLabel("When (empty: now)").fill("2024-03-01T12:00");
    await page.getByLabel("Reason").fill("Low charge at the sight glass");
    await page.getByRole("button", { name: "Add to the log" }).click();
    await expect.poll(() => page.getByTestId("refrigerant-entry").count(), wait).toBe(2);
    const summary = page.getByTestId("refrigerant-summary");
    await expect.poll(() => summary.textContent(), wait).toContain("12.2 %/yr");
    expect(await summary.textContent()).toContain("500.0 lb");

    // A leak check with no result is refused by the form before anything is sent.
    await page.getByLabel("What").selectOption("leak_check");
    await page.getByLabel("Where and how it was checked").fill("Electronic detector, all joints");
    await page.getByRole("button", { name: "Add to the log" }).click();
    await expect.poll(() => page.getByText("Give the leak check's result").count(), wait).toBe(1);
    await page.getByLabel("Result").selectOption("no_leak");
    await page.getByRole("button", { name: "Add to the log" }).click();
    await expect.poll(() => page.getByTestId("refrigerant-entry").count(), wait).toBe(3);
    // The form starts empty again, so an old date is not carried into the next entry.
    expect(await page.getByLabel("When (empty: now)").inputValue()).toBe("");
    expect(await page.getByLabel("What").inputValue()).toBe("leak_check");
    await screenshot(page, "refrigerant-log-technician-phone");
    expect(problems).toEqual([]);
    await context.close();
  }, 240_000);
});
