import { describe, expect, it } from "vitest";
import { optionalPointsByKind, pointsByKind } from "@/lib/quantities";
import {
  equipmentOf,
  fromWire,
  pointMapCsv,
  pointMapRows,
  runScenario,
  siteLayouts,
  toWire,
  type RunSample,
} from "@/simulator";

describe("point map and wire units", () => {
  it("every equipment emits exactly the quantity keys of pointsByKind, plus the optional ones it has (lib/quantities.ts)", () => {
    for (const layout of Object.values(siteLayouts)) {
      let first: RunSample | undefined;
      for (const s of runScenario({ scenario: "normal-day", seed: 1, startMs: 0, durationS: 0, layout })) {
        first = s;
        break;
      }
      if (!first) throw new Error("no sample");
      for (const eq of equipmentOf(layout)) {
        const got = first.readings.filter((r) => r.equipment === eq.tag).map((r) => r.quantity);
        const optional = (optionalPointsByKind[eq.kind] ?? []).filter(() => layout.towerBypass);
        expect(got).toEqual([...pointsByKind[eq.kind], ...optional]);
      }
    }
  });
  it("point names are controller style and unique; the map CSV has the documented header", () => {
    const rows = pointMapRows(siteLayouts.default);
    expect(new Set(rows.map((r) => r.gateway_point)).size).toBe(rows.length);
    expect(rows).toContainEqual({
      gateway_point: "CH1-LCHWT",
      equipment: "CH-1",
      quantity: "chilled_water_leaving_temp",
      unit: "degF",
    });
    expect(rows).toContainEqual({
      gateway_point: "CT1-FAN-MODE",
      equipment: "CT-1",
      quantity: "fan_drive_mode",
      unit: "state",
    });
    expect(pointMapCsv(siteLayouts["medical-office"]).split("\n")[0]).toBe("gateway_point,equipment,quantity,unit");
  });
  it("pressures go out as gauge: 101.325 kPa abs → 0 psig; 342.95 kPa → 35.05 psig (REFERENCES.md §1 conventions)", () => {
    expect(toWire("condenser_refrigerant_pressure", 101.325) as number).toBeCloseTo(0, 6);
    expect(toWire("evaporator_refrigerant_pressure", 342.95) as number).toBeCloseTo(35.05, 1);
    expect(toWire("chilled_water_leaving_temp", 6.6667) as number).toBeCloseTo(44, 2);
    expect(toWire("chilled_water_flow", 63.0902) as number).toBeCloseTo(1000, 1);
    expect(toWire("evaporator_water_dp", 6.894757) as number).toBeCloseTo(1, 6);
    for (const q of [
      "condenser_refrigerant_pressure",
      "chilled_water_flow",
      "drive_temp",
      "evaporator_water_dp",
    ] as const)
      expect(fromWire(q, toWire(q, 123.4)) as number).toBeCloseTo(123.4, 9);
  });
});
