import { describe, expect, it } from "vitest";
import type { TemporaryChangeDto, VisitDto, VisitSnapshot } from "@/lib/dto/service";
import { keyNumbersInWords, visitReportModel } from "@/lib/service/report";

// The customer's report in words (lib/service/report.ts). Times are checked against the IANA time zone
// database: America/Chicago keeps Central Daylight Time, UTC−5, in July.

const point = (equipmentTag: string, quantity: string, display: string) => ({
  equipmentTag,
  quantity,
  value: null,
  display,
  tsMs: 0,
  stale: false,
});
const snapshot = (points: VisitSnapshot["points"]): VisitSnapshot => ({ atMs: 0, derived: null, points });

describe("keyNumbersInWords", () => {
  it("says each key point's value at the start and end, by equipment in the report's order, and leaves other points out", () => {
    const open = snapshot([
      point("CH-1", "condenser_water_entering_temp", "24.1 °C"),
      point("CH-1", "chilled_water_leaving_temp", "12.4 °C"),
      point("CH-1", "compressor_speed", "80 %"),
    ]);
    const close = snapshot([
      point("CH-1", "chilled_water_leaving_temp", "6.9 °C"),
      point("CH-1", "condenser_water_entering_temp", "24.1 °C"),
      point("CT-1", "outdoor_air_temp", "31.0 °C"),
    ]);
    expect(keyNumbersInWords(open, close)).toEqual([
      "CH-1 chilled water leaving was 12.4 °C when the visit began and 6.9 °C when it ended.",
      "CH-1 condenser water entering was 24.1 °C when the visit began and when it ended.",
      "CT-1 outdoor air temp was 31.0 °C when the visit ended (no reading when it began).",
    ]);
  });

  it("says nothing without snapshots", () => {
    expect(keyNumbersInWords(null, null)).toEqual([]);
  });
});

describe("visitReportModel", () => {
  const change = (over: Partial<TemporaryChangeDto>): TemporaryChangeDto => ({
    id: "c1",
    visitId: "v1",
    siteId: "s1",
    equipmentId: null,
    equipmentTag: "CH-1",
    equipmentName: "Chiller 1",
    kind: "controller_setting",
    what: "start-to-start timer",
    pointQuantity: null,
    fromValue: "20 min",
    toValue: "5 min",
    reason: "recover from the trip",
    madeBy: "Luis Ferreira",
    madeAt: Date.UTC(2026, 6, 15, 14, 10),
    putBackDueAt: Date.UTC(2026, 6, 15, 21, 0),
    putBackAt: null,
    putBackBy: null,
    valueNow: null,
    reminders: 0,
    escalatedAt: null,
    plainText: "A technician set the chiller's restart timer shorter.",
    liveCheck: null,
    ...over,
  });
  const visit: VisitDto = {
    id: "v1",
    siteId: "s1",
    siteName: "Harborview",
    siteTimeZone: "America/Chicago",
    technician: { id: "u1", name: "Luis Ferreira" },
    mode: "on_site",
    origin: "service_request",
    serviceRequestId: null,
    openedAt: Date.UTC(2026, 6, 15, 13, 30),
    arrivedAt: Date.UTC(2026, 6, 15, 14, 0),
    departedAt: Date.UTC(2026, 6, 15, 16, 45),
    closedAt: Date.UTC(2026, 6, 15, 16, 50),
    summary: "Cleaned the strainer",
    partsUsed: [{ part: "Strainer gasket", quantity: 1 }],
    openChangesNote: "Timer stays short until the tower is cleaned",
    openChangesOwner: { id: "u1", name: "Luis Ferreira" },
    entries: [
      { id: 1, at: Date.UTC(2026, 6, 15, 14, 5), author: "Luis Ferreira", text: "Strainer blocked", fileId: null },
    ],
    openSnapshot: null,
    closeSnapshot: null,
    alarms: [],
    changes: [
      change({}),
      change({ id: "c2", putBackAt: Date.UTC(2026, 6, 15, 16, 30), valueNow: "20 min", plainText: "Fan in hand." }),
    ],
  };

  it("gives the visit's times in the site's zone (CDT, UTC−5) and says which changes are back", () => {
    const model = visitReportModel(visit, { name: "Harborview", address: "1450 Larkspur Avenue" }, []);
    expect(model.when).toBe("July 15, 2026 at 9:00 AM to 11:45 AM");
    expect(model.findings).toEqual(["9:05 AM — Strainer blocked"]);
    expect(model.done).toEqual(["Cleaned the strainer", "Part used: Strainer gasket × 1"]);
    expect(model.changes[0]).toBe(
      "A technician set the chiller's restart timer shorter. It is still in place and is due to be put back by July 15, 2026 at 4:00 PM.",
    );
    expect(model.changes[1]).toBe("Fan in hand. It was put back on July 15, 2026 at 11:30 AM (now 20 min).");
    expect(model.closing).toContain("Luis Ferreira will put them back");
  });
});
