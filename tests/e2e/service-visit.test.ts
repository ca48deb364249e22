import { describe, expect, it } from "vitest";
import { api, adminCookie, raiseChillerTrip, waitFor } from "../helpers/mqtt";
import { hasChromium, screenshot, signInAs, useServerAndBrowser, viewports } from "../helpers/browser";

// The service call as a technician lives it, on a phone (390×844): an alarm on the demo site, a
// visit opened from it, the anti-recycle timer shortened with a short put-back-by, a finding, the
// visit closed with the change still in place, the reminder e-mail in the sink, the customer's
// plain-words sentence, and the change cleared everywhere once marked put back.
describe.skipIf(!hasChromium)("a service visit at phone width", () => {
  // Reminders every second here so a put-back-by 20 s out passes within the test.
  const env = useServerAndBrowser({ env: { CHANGE_REMINDER_TICK_MS: "1000" } });

  it("runs from alarm to put-back", { timeout: 900_000 }, async () => {
    const admin = await adminCookie(env.server);
    const alarmId = await raiseChillerTrip(env.server, admin, "harborview-mob", "CH-1", "High condenser pressure");

    const tech = await env.browser.newContext({ viewport: viewports.phone });
    // A development-mode server compiles each page on its first request; that can take a while here.
    tech.setDefaultTimeout(180_000);
    const page = await tech.newPage();
    await signInAs(page, env.server.url, "luis@tallgrass.example");
    await page.goto(`${env.server.url}/alarms/${alarmId}`);
    await page.getByTestId("open-visit").click();
    await page.waitForURL(/\/visits\//, { timeout: 60_000 });
    const visitUrl = page.url();
    // A click before the page has hydrated does nothing; click again until the alarm is acknowledged.
    const ack = page.getByRole("button", { name: "Acknowledge" });
    await expect
      .poll(
        async () => {
          if (await ack.count())
            await ack
              .first()
              .click({ timeout: 5000 })
              .catch(() => {});
          return ack.count();
        },
        { timeout: 120_000, interval: 3000 },
      )
      .toBe(0);

    await page.getByRole("button", { name: "Record a temporary change" }).click();
    await page.getByLabel("Equipment").selectOption("harborview-mob:CH-1");
    await page.getByLabel(/Setting shown by a live point/).selectOption("start_to_start_timer_setting");
    await page.getByLabel("What", { exact: true }).fill("Start-to-start timer");
    await page.getByLabel("From", { exact: true }).fill("20 min");
    await page.getByLabel("To", { exact: true }).fill("5 min");
    await page.getByLabel("Why", { exact: true }).fill("to recover from this morning's trip");
    const due = await page.evaluate(() => {
      const ms = Date.now() + 20_000;
      return new Date(ms - new Date(ms).getTimezoneOffset() * 60_000).toISOString().slice(0, 19);
    });
    await page.getByLabel("Put back by").fill(due);
    await screenshot(page, "visit-change-form-phone");
    await page.getByRole("button", { name: "Save change" }).click();
    await expect.poll(() => page.getByTestId("visit-change").count(), { timeout: 20_000 }).toBe(1);

    await page.getByLabel("Finding or action").fill("Condenser tubes fouled; tower fan drive was in fault");
    await page.getByRole("button", { name: "Send", exact: true }).click();
    await expect
      .poll(() => page.getByTestId("visit-log").textContent(), { timeout: 20_000 })
      .toContain("Condenser tubes fouled");
    await screenshot(page, "visit-log-phone");

    await page.getByLabel(/Summary/).fill("Reset the tower fan drive; CH-1 restarted on a shortened timer");
    await page.getByLabel("Why it stays in place").fill("Plant must carry the afternoon load");
    await page.getByLabel("Who will put it back").selectOption({ label: "Priya Raman" });
    await page.getByRole("button", { name: "Close visit" }).click();
    await expect.poll(() => page.getByTestId("visit-state").textContent(), { timeout: 20_000 }).toContain("closed");
    await screenshot(page, "visit-closed-phone");

    // The reminder reaches the on-call technician once put-back-by has passed.
    const reminder = await waitFor(
      async () => {
        const { body } = await api(env.server, admin, "/api/outbox");
        return (body.messages as Array<{ to: string; subject: string; text: string }>).find((m) =>
          m.subject.includes("Put back"),
        );
      },
      60_000,
      500,
    );
    expect(reminder.to).toBe("luis@tallgrass.example");
    expect(reminder.text).toContain("Start-to-start timer: 20 min → 5 min");

    const customer = await env.browser.newContext({ viewport: viewports.phone });
    customer.setDefaultTimeout(180_000);
    const owner = await customer.newPage();
    await signInAs(owner, env.server.url, "facilities@harborview.example");
    await owner.goto(`${env.server.url}/sites/harborview-mob`);
    await expect
      .poll(() => owner.getByTestId("change-plain").textContent(), { timeout: 20_000 })
      .toMatch(/A technician has set .+'s restart timer shorter to recover from this morning's trip/);
    await screenshot(owner, "site-customer-change-phone");

    await page.goto(visitUrl);
    const putBack = page.getByRole("button", { name: "Put back" });
    await expect
      .poll(
        async () => {
          if (await putBack.count())
            await putBack
              .first()
              .click({ timeout: 5000 })
              .catch(() => {});
          return putBack.count();
        },
        { timeout: 120_000, interval: 3000 },
      )
      .toBe(0);
    await screenshot(page, "visit-put-back-phone");

    await owner.reload();
    await expect.poll(() => owner.getByTestId("change-banner").count(), { timeout: 20_000 }).toBe(0);
    await page.goto(`${env.server.url}/`);
    await expect.poll(() => page.getByTestId("site-card").count(), { timeout: 20_000 }).toBe(3);
    expect(await page.getByTestId("site-changes").count()).toBe(0);
    await page.goto(`${env.server.url}/alarms/${alarmId}`);
    await expect.poll(() => page.getByTestId("open-visit").count(), { timeout: 120_000 }).toBe(1);
    expect(await page.getByTestId("change-banner").count()).toBe(0);
    await tech.close();
    await customer.close();
  });
});
