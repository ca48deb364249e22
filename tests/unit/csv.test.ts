import { describe, expect, it } from "vitest";
import Papa from "papaparse";
import { csvCell } from "@/lib/csv";
import { csvLinesOfSample, eventLine } from "@/simulator/csv";

// OWASP "CSV Injection": cells beginning with = + - @ tab or CR are prefixed with a single quote
// and quoted, so a spreadsheet shows them as text instead of running them.
describe("CSV cells", () => {
  it("neutralises formula prefixes", () => {
    expect(csvCell('=HYPERLINK("http://x.example","y")')).toBe(`"'=HYPERLINK(""http://x.example"",""y"")"`);
    expect(csvCell("+cmd|' /C calc'!A0")).toBe(`"'+cmd|' /C calc'!A0"`);
    expect(csvCell("-2+3")).toBe(`"'-2+3"`);
    expect(csvCell("@SUM(A1:A2)")).toBe(`"'@SUM(A1:A2)"`);
    expect(csvCell("\t=1")).toBe(`"'\t=1"`);
    expect(csvCell("\r=1")).toBe(`"'\r=1"`);
  });

  it("leaves numbers, negative ones included, and plain text as they are", () => {
    for (const n of ["-3.5", "+2", "-1e-3", "44.30", "0"]) expect(csvCell(n)).toBe(n);
    expect(csvCell("High condenser pressure")).toBe("High condenser pressure");
    expect(csvCell('a "quoted", b')).toBe('"a ""quoted"", b"');
  });

  it("is what the simulator's CSV writes: a fault text or event message cannot become a formula", () => {
    const line = eventLine({ tsMs: 0, kind: "fault", equipment: "CH-1", message: "=1+1 trip" } as never);
    expect(line).toBe(`# event,1970-01-01T00:00:00.000Z,fault,CH-1,"'=1+1 trip"`);
    const kinds = new Map([["CH-1", "chiller" as const]]);
    const [row] = csvLinesOfSample(
      { tsMs: 0, events: [], readings: [{ equipment: "CH-1", quantity: "fault_text", value: "@evil" }] } as never,
      kinds,
      false,
    );
    const cells = Papa.parse<string[]>(row).data[0];
    expect(cells[2]).toBe("'@evil");
    const [num] = csvLinesOfSample(
      { tsMs: 0, events: [], readings: [{ equipment: "CH-1", quantity: "condenser_water_dp", value: -1.5 }] } as never,
      kinds,
      false,
    );
    expect(Papa.parse<string[]>(num).data[0][2]).toMatch(/^-\d/);
  });
});
