import { describe, expect, it } from "vitest";
import { checkAgainstReading, inPlaceFor, parseDurationS, plainChangeSentence } from "@/lib/service/changes";

// Temporary changes in words. Unit conversions: 1 min = 60 s, 1 h = 3600 s (SI Brochure, 9th ed.,
// Table 8, units accepted for use with the SI).

describe("parseDurationS", () => {
  it("reads what technicians type as seconds (SI Brochure Table 8)", () => {
    expect(parseDurationS("15 min")).toBe(900);
    expect(parseDurationS("900 s")).toBe(900);
    expect(parseDurationS("0.5 h")).toBe(1800);
    expect(parseDurationS("900")).toBe(900);
    expect(parseDurationS("on")).toBeNull();
    expect(parseDurationS("15 furlongs")).toBeNull();
  });
});

describe("checkAgainstReading", () => {
  const reading = (value: number) => ({ value, display: `${value} s`, tsMs: 1, measure: "duration" });
  it("agrees when the controller shows the value before the change, within a second", () => {
    const c = { fromValue: "20 min", toValue: "5 min", putBackAt: 5 };
    expect(checkAgainstReading(c, reading(1200)).matchesPutBack).toBe(true);
    expect(checkAgainstReading(c, reading(1201)).matchesPutBack).toBe(true);
  });
  it("says when a change marked put back still reads the temporary value", () => {
    const check = checkAgainstReading({ fromValue: "20 min", toValue: "5 min", putBackAt: 5 }, reading(300));
    expect(check.matchesPutBack).toBe(false);
    expect(check.message).toContain("still the temporary value");
  });
  it("cannot tell for a value that is not a time", () => {
    const c = { fromValue: "auto", toValue: "hand", putBackAt: null };
    expect(checkAgainstReading(c, reading(300)).matchesPutBack).toBeNull();
  });
});

describe("plainChangeSentence", () => {
  const base = {
    kind: "controller_setting" as const,
    what: "Start-to-start timer",
    pointQuantity: "start_to_start_timer_setting",
    fromValue: "20 min",
    toValue: "5 min",
    reason: "to recover from this morning's trip",
    equipmentName: "Chiller 1",
    putBackAt: null,
  };
  // 2026-06-01 20:00 UTC is 4:00 p.m. in New York (EDT, UTC−4; IANA tz database).
  const due = Date.UTC(2026, 5, 1, 20, 0, 0);
  const now = Date.UTC(2026, 5, 1, 15, 0, 0);

  it("tells the customer what was done, why and when it goes back, in their site's time", () => {
    expect(plainChangeSentence({ ...base, putBackDueAt: due }, "America/New_York", now)).toBe(
      "A technician has set Chiller 1's restart timer shorter to recover from this morning's trip; it will be set back by 4:00 PM.",
    );
  });
  it("says when it is overdue, and when it was put back", () => {
    expect(plainChangeSentence({ ...base, putBackDueAt: due }, "America/New_York", due + 60_000)).toContain("overdue");
    expect(plainChangeSentence({ ...base, putBackDueAt: due, putBackAt: due }, "America/New_York", due)).toContain(
      "it was put back at 4:00 PM",
    );
  });
  it("puts a safety bypass in words without trade terms", () => {
    const s = plainChangeSentence(
      {
        ...base,
        kind: "safety_bypassed",
        what: "Low flow switch",
        reason: "flow switch paddle stuck",
        putBackDueAt: due,
      },
      "America/New_York",
      now,
    );
    expect(s).toMatch(/^A technician has temporarily bypassed a protection on Chiller 1's equipment/);
    expect(s).toContain("(flow switch paddle stuck)");
  });
});

describe("inPlaceFor", () => {
  it("gives hours and minutes", () => {
    expect(inPlaceFor(0, 80 * 60_000)).toBe("1 h 20 min");
    expect(inPlaceFor(0, 45_000)).toBe("45 s");
    expect(inPlaceFor(0, 100 * 60_000)).toBe("1 h 40 min");
  });
});
