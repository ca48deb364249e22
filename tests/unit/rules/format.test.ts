import { describe, expect, it } from "vitest";
import { fmtDelta, fmtRate, fmtTemp } from "@/lib/rules/format";

// Alarm titles give °F beside SI. The conversions are exact by definition (NIST SP 811, 2008,
// Appendix B.9, temperature: t/°F = 1.8·t/°C + 32, and a temperature interval of 1 K = 1.8 °F,
// as in tests/unit/units.test.ts).
describe("alarm-title numbers", () => {
  it("a temperature: 20.7 °C is 69.26 °F, shown to the degree", () => {
    expect(fmtTemp(20.7)).toBe("20.7 °C (69 °F)");
  });

  it("a temperature difference: 2.4 K is 4.32 °F", () => {
    expect(fmtDelta(2.4)).toBe("2.4 K (4.3 °F)");
  });

  it("a rate: 0.51 K/min is 0.918 °F/min; 0.40 K/min is 0.72 °F/min", () => {
    expect(fmtRate(0.51)).toBe("0.51 K/min (0.92 °F/min)");
    expect(fmtRate(0.4)).toBe("0.40 K/min (0.72 °F/min)");
  });
});
