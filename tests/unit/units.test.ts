import { describe, expect, it } from "vitest";
import { fromCanonical, STANDARD_ATMOSPHERE_KPA, toCanonical } from "@/lib/units";

// Conversion factors checked against NIST Special Publication 811 (2008 edition),
// "Guide for the Use of the International System of Units", Appendix B.8 (factors by unit)
// and B.9 (temperature). NIST gives 7 significant digits, so checks are to 1 part in 10^6.
const close = (actual: number, expected: number, rel = 1e-6) =>
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(Math.abs(expected) * rel + 1e-12);

describe("wire units to canonical SI (NIST SP 811)", () => {
  it("psi → kPa: 1 lbf/in² = 6.894757 E+03 Pa (B.8)", () => {
    close(toCanonical(1, "psia"), 6.894757);
    close(toCanonical(100, "psid"), 689.4757);
  });

  it("psig adds one standard atmosphere, 1.01325 E+05 Pa (B.8, 'atmosphere, standard')", () => {
    expect(STANDARD_ATMOSPHERE_KPA).toBe(101.325);
    close(toCanonical(0, "psig"), 101.325);
    close(toCanonical(50, "psig"), 50 * 6.894757 + 101.325);
  });

  it("gpm → L/s: 1 gal (U.S.)/min = 6.309020 E-05 m³/s (B.8)", () => {
    close(toCanonical(1, "gpm"), 0.0630902);
    close(toCanonical(720, "gpm"), 720 * 0.0630902);
  });

  it("°F → °C: t/°C = (t/°F − 32)/1.8 (B.9)", () => {
    close(toCanonical(32, "degF"), 0);
    close(toCanonical(44.3, "degF"), (44.3 - 32) / 1.8);
    close(toCanonical(212, "degF"), 100);
    close(toCanonical(-40, "degF"), -40);
  });

  it("K → °C: t/°C = T/K − 273.15 (B.9)", () => {
    close(toCanonical(273.15, "K"), 0, 1e-9);
    close(toCanonical(300, "K"), 26.85);
  });

  it("bar → kPa: 1 bar = 1.0 E+05 Pa (B.8)", () => {
    close(toCanonical(1, "bar"), 100);
    close(toCanonical(1, "barg"), 100 + 101.325);
  });

  it("W → kW and min → s are exact SI multiples", () => {
    close(toCanonical(1500, "W"), 1.5);
    close(toCanonical(2, "min"), 120);
  });

  it("display back in IP undoes the conversion (gauge pressure shown as psig)", () => {
    close(fromCanonical(toCanonical(44.3, "degF"), "temperature", "ip"), 44.3);
    close(fromCanonical(toCanonical(37.5, "psig"), "pressure", "ip"), 37.5);
    close(fromCanonical(toCanonical(1200, "gpm"), "flow", "ip"), 1200);
  });
});
