import { describe, expect, it } from "vitest";
import { fmtDelta, fmtPressure, fmtPressureRate, fmtRate, fmtTemp } from "@/lib/rules/format";
import { formatQuantity, quantitiesIn, renderDetailWords, renderQuantities } from "@/lib/quantity-text";

// Rule messages store each number as a quantity (kind + canonical SI value) and every reader sees
// it in their own units. Conversions are exact by definition (NIST SP 811, 2008, Appendix B.9:
// t/°F = 1.8·t/°C + 32, a temperature interval of 1 K = 1.8 °F; Appendix B.8: 1 psi = 6.894 757 kPa,
// standard atmosphere 101.325 kPa, which separates gauge from absolute pressure).
describe("quantities in alarm words", () => {
  it("a message carries each number as value + kind, not as text in one unit", () => {
    const message = `CH-1: condenser pressure ${fmtPressure(689.476)}, margin ${fmtDelta(2.4)}, water ${fmtTemp(20.7)}.`;
    expect(quantitiesIn(message)).toEqual([
      { kind: "p", value: 689.476 },
      { kind: "dt", value: 2.4 },
      { kind: "t", value: 20.7 },
    ]);
    expect(message).not.toMatch(/°|kPa|psi/);
  });

  it("a temperature: 20.7 °C is 69.26 °F (NIST SP 811 B.9)", () => {
    expect(renderQuantities(fmtTemp(20.7), "ip")).toBe("69.3 °F");
    expect(renderQuantities(fmtTemp(20.7), "si")).toBe("20.7 °C");
  });

  it("a temperature difference: 2.4 K is 4.32 °F; a rate 0.51 K/min is 0.918 °F/min", () => {
    expect(renderQuantities(fmtDelta(2.4), "ip")).toBe("4.3 °F");
    expect(renderQuantities(fmtDelta(2.4), "si")).toBe("2.4 K");
    expect(renderQuantities(fmtRate(0.51), "ip")).toBe("0.92 °F/min");
    expect(renderQuantities(fmtRate(0.4), "si")).toBe("0.40 K/min");
  });

  it("a pressure is marked gauge or absolute: 689.476 kPa abs is 85.3 psig (100 psia less 14.696)", () => {
    // 689.476 kPa / 6.894757 kPa/psi = 100.0 psia; less 101.325 kPa = 14.696 psi of atmosphere.
    expect(renderQuantities(fmtPressure(689.476), "ip")).toBe("85.3 psig");
    expect(renderQuantities(fmtPressure(689.476), "si")).toBe("689 kPa abs");
  });

  it("a pressure difference and its rate carry no gauge offset: 68.94757 kPa is 10 psi", () => {
    expect(renderQuantities(fmtPressure(68.94757, true), "ip")).toBe("10.0 psi");
    expect(renderQuantities(fmtPressure(68.94757, true), "si")).toBe("69 kPa");
    expect(renderQuantities(fmtPressureRate(6.894757), "ip")).toBe("1.00 psi/min");
    expect(formatQuantity("pr", 6.894757, "si")).toBe("6.9 kPa/min");
  });

  it("words stored before quantities (both units written out) read as they were", () => {
    const old = "CH-1: condenser pressure 900 kPa (116 psig), 135 kPa below its 1035 kPa (135 psig) cut-out.";
    expect(renderQuantities(old, "si")).toBe(old);
    expect(renderQuantities(old, "ip")).toBe(old);
  });

  it("renders messages, advice and caution of a stored detail alike", () => {
    const detail = {
      technicianMessage: `evaporating at ${fmtTemp(1.5)}`,
      ownerMessage: "The chiller is close to its low-pressure limit.",
      advice: [`Hold the chilled water above ${fmtTemp(4)}.`],
      caution: null,
    };
    const si = renderDetailWords(detail, "si");
    expect(si.technicianMessage).toBe("evaporating at 1.5 °C");
    expect(si.advice).toEqual(["Hold the chilled water above 4.0 °C."]);
    // 4 °C = 39.2 °F (NIST SP 811 B.9).
    expect(renderDetailWords(detail, "ip").advice).toEqual(["Hold the chilled water above 39.2 °F."]);
  });
});
