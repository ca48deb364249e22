// A datetime-local value read on the site's clock, checked against the platform's ICU time zone data
// (Intl.DateTimeFormat, the IANA database) across a daylight-saving change.
import { describe, expect, it } from "vitest";
import { fromSiteWallInput, toSiteWallInput } from "@/lib/client/site-wall-time";

/** The wall clock Intl gives for a moment in a zone, as `YYYY-MM-DDTHH:mm`. */
function intlWall(ms: number, timeZone: string): string {
  const parts = Object.fromEntries(
    new Intl.DateTimeFormat("en-CA", {
      timeZone,
      year: "numeric",
      month: "2-digit",
      day: "2-digit",
      hour: "2-digit",
      minute: "2-digit",
      hourCycle: "h23",
    })
      .formatToParts(ms)
      .map((p) => [p.type, p.value]),
  );
  return `${parts.year}-${parts.month}-${parts.day}T${parts.hour}:${parts.minute}`;
}

describe("site wall-clock inputs", () => {
  const zones = ["America/New_York", "America/Phoenix", "Europe/Berlin", "Asia/Kolkata"];
  // Every 37 min for three days around the US spring change (2026-03-08, 02:00 local in New York).
  const moments = Array.from({ length: 120 }, (_, i) => Date.UTC(2026, 2, 7, 0, 0) + i * 37 * 60_000);

  it("writes the wall clock Intl gives in each zone", () => {
    for (const tz of zones) for (const ms of moments) expect(toSiteWallInput(ms, tz), tz).toBe(intlWall(ms, tz));
  });

  it("reads it back to the same minute, whatever zone the device is in", () => {
    for (const tz of zones)
      for (const ms of moments) {
        const minute = Math.floor(ms / 60_000) * 60_000;
        expect(fromSiteWallInput(toSiteWallInput(ms, tz), tz), tz).toBe(minute);
      }
  });

  it("14:00 on 1 July in New York is 18:00 UTC (EDT, UTC−4); in Kolkata 08:30 UTC (IST, UTC+5:30)", () => {
    expect(fromSiteWallInput("2026-07-01T14:00", "America/New_York")).toBe(Date.UTC(2026, 6, 1, 18, 0));
    expect(fromSiteWallInput("2026-07-01T14:00", "Asia/Kolkata")).toBe(Date.UTC(2026, 6, 1, 8, 30));
  });

  it("refuses what is not a datetime-local value", () => {
    expect(fromSiteWallInput("yesterday", "America/New_York")).toBeNaN();
  });
});
