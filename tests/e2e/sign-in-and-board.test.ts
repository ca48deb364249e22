import { describe, expect, it } from "vitest";
import { hasChromium, useServerAndBrowser, screenshot, signInAs, viewports, watchConsole } from "../helpers/browser";

describe.skipIf(!hasChromium)("sign-in and the board in Chromium", () => {
  const env = useServerAndBrowser();

  for (const [size, viewport] of Object.entries(viewports)) {
    it(`a technician signs in and sees all three sites (${size})`, async () => {
      const context = await env.browser.newContext({ viewport });
      const page = await context.newPage();
      const problems = watchConsole(page);
      await signInAs(page, env.server.url, "luis@tallgrass.example");
      const cards = page.getByTestId("site-card");
      await expect.poll(() => cards.count()).toBe(3);
      await expect.poll(() => page.getByTestId("viewer").textContent()).toContain("Technician");
      await screenshot(page, `board-technician-${size}`);
      await page.getByRole("link", { name: /Quarry Ridge Data Hall 2/ }).click();
      await page.waitForURL(/\/sites\/quarry-ridge-dh2$/);
      await expect.poll(() => page.getByTestId("equipment").count()).toBeGreaterThan(5);
      await screenshot(page, `site-technician-${size}`);
      expect(problems).toEqual([]);
      await context.close();
    });
  }

  it("a customer sees only its own site, and another site's URL shows the not-found page", async () => {
    const context = await env.browser.newContext({ viewport: viewports.phone });
    const page = await context.newPage();
    await signInAs(page, env.server.url, "facilities@millbrook.example");
    await expect.poll(() => page.getByTestId("site-card").count()).toBe(1);
    expect(await page.getByTestId("site-card").textContent()).toContain("Millbrook High School");
    await screenshot(page, "board-customer-phone");
    const res = await page.goto(`${env.server.url}/sites/harborview-mob`);
    expect(res?.status()).toBe(404);
    expect(await page.getByRole("heading", { level: 1 }).textContent()).toBe("Not found");
    await screenshot(page, "not-found-customer-phone");
    await context.close();
  });

  it("a wrong password shows a clear message and signing out returns to sign-in", async () => {
    const context = await env.browser.newContext({ viewport: viewports.desktop });
    const page = await context.newPage();
    await page.goto(`${env.server.url}/sign-in`);
    // Wait for the form to be live: a click before hydration would submit it as a plain GET.
    await page.waitForLoadState("networkidle");
    await page.getByLabel("E-mail").fill("admin@tallgrass.example");
    await page.getByLabel("Password").fill("not-the-password");
    await page.getByRole("button", { name: "Sign in" }).click();
    // A refusal costs a full bcrypt comparison (cost 12), which takes seconds on a loaded machine.
    await expect.poll(() => page.getByText("E-mail or password is incorrect").count(), { timeout: 15_000 }).toBe(1);
    expect(await page.locator("form [role=alert]").textContent()).toContain("E-mail or password is incorrect");
    await screenshot(page, "sign-in-error-desktop");
    await signInAs(page, env.server.url, "admin@tallgrass.example");
    await page.getByRole("button", { name: "Sign out" }).click();
    await page.waitForURL(/\/sign-in/);
    const again = await page.goto(`${env.server.url}/`);
    expect(new URL(again!.url()).pathname).toBe("/sign-in");
    await context.close();
  }, 120_000);
});
