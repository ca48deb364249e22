import { describe, expect, it } from "vitest";
import { wetBulbC } from "@/lib/psychrometrics";

describe("wet bulb through PsychroLib (ASHRAE Handbook—Fundamentals 2017 ch. 1)", () => {
  it("25 °C, RH 20 % → 12.513 °C (PsychroLib documented example, REFERENCES.md §6)", () => {
    expect(wetBulbC(25, 20)).toBeCloseTo(12.513, 2);
  });
  it("40 °C dry bulb with RH 14 % gives about 20 °C wet bulb (ASHRAE Fundamentals 2017 ch. 1 example, REFERENCES.md §6)", () => {
    // The example gives RH = 14 % (rounded) for 40/20 °C; rounding RH costs a few tenths of a kelvin.
    expect(Math.abs(wetBulbC(40, 14) - 20)).toBeLessThan(0.4);
  });
  it("saturated air: wet bulb equals dry bulb", () => {
    expect(wetBulbC(20, 100)).toBeCloseTo(20, 2);
  });
});
