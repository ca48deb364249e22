import { describe, expect, it } from "vitest";
import { formatDuration } from "@/lib/units";

describe("durations as screens and alarm messages give them", () => {
  it("seconds below a minute and a half, whole minutes below an hour and a half, then hours and minutes", () => {
    expect(formatDuration(42)).toBe("42 s");
    expect(formatDuration(89.4)).toBe("89 s");
    expect(formatDuration(90)).toBe("2 min");
    expect(formatDuration(25 * 60)).toBe("25 min");
    expect(formatDuration(89 * 60)).toBe("89 min");
    expect(formatDuration(90 * 60)).toBe("1 h 30 min");
    expect(formatDuration(2 * 3600)).toBe("2 h");
    expect(formatDuration(3.5 * 3600)).toBe("3 h 30 min");
  });

  it("an unknown or negative duration", () => {
    expect(formatDuration(null)).toBe("—");
    expect(formatDuration(undefined)).toBe("—");
    expect(formatDuration(Number.POSITIVE_INFINITY)).toBe("—");
    expect(formatDuration(-5)).toBe("0 s");
  });
});
