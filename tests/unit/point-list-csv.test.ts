import { describe, expect, it } from "vitest";
import {
  formatPointListCsv,
  parsePointListCsv,
  planPointList,
  POINT_LIST_COLUMNS,
  type ExistingEquipment,
  type ExistingPoint,
} from "@/lib/point-list-csv";
import { pointsByKind } from "@/lib/quantities";

const HEADER = "equipment_tag, equipment_kind, quantity, unit, expected_interval_s, low_limit, high_limit";

const good = [
  HEADER,
  "CH-1,chiller,chilled_water_leaving_temp,degF,5,38,60",
  "CH-1,chiller,condenser_refrigerant_pressure,psig,5,,150",
  "CH-1,chiller,run_status,bool,10,,",
  "CT-1,cooling_tower,fan_drive_mode,state,5,,",
  "CHWP-1,pump,pump_speed,%,5,20,100",
  "WS-1,weather_station,outdoor_air_temp,degC,60,-40,50",
].join("\n");

describe("point-list CSV parser", () => {
  it("reads a good file and keeps limits in canonical units", () => {
    const { rows, errors } = parsePointListCsv(good);
    expect(errors).toEqual([]);
    expect(rows).toHaveLength(6);
    const chw = rows[0];
    expect(chw).toMatchObject({ line: 2, equipmentTag: "CH-1", quantity: "chilled_water_leaving_temp" });
    expect(chw.canonicalUnit).toBe("degC");
    // 38 °F = 3.333… °C and 60 °F = 15.555… °C: t/°C = (t/°F − 32)/1.8 (NIST SP 811 B.8).
    expect(chw.lowLimit).toBeCloseTo((38 - 32) / 1.8, 9);
    expect(chw.highLimit).toBeCloseTo((60 - 32) / 1.8, 9);
    // 150 psig = 150 × 6.894757 + 101.325 kPa absolute (plant-reference.md conventions; NIST SP 811 B.8).
    expect(rows[1].highLimit).toBeCloseTo(150 * 6.894757 + 101.325, 3);
    expect(rows[1].lowLimit).toBeNull();
    expect(rows[2]).toMatchObject({ quantity: "run_status", expectedIntervalS: 10, lowLimit: null, highLimit: null });
    expect(rows[5]).toMatchObject({ lowLimit: -40, highLimit: 50, expectedIntervalS: 60 });
  });

  it("accepts the canonical unit, differential pressure's kPa included", () => {
    const { rows, errors } = parsePointListCsv(`${HEADER}\nCH-1,chiller,evaporator_water_dp,kPa,5,0,100`);
    expect(errors).toEqual([]);
    expect(rows[0].highLimit).toBe(100);
  });

  it("accepts a header without spaces, a byte-order mark and CRLF line ends", () => {
    const text = "\uFEFF" + good.replace(HEADER, POINT_LIST_COLUMNS.join(",")).replace(/\n/g, "\r\n") + "\r\n";
    const { rows, errors } = parsePointListCsv(text);
    expect(errors).toEqual([]);
    expect(rows.map((r) => r.line)).toEqual([2, 3, 4, 5, 6, 7]);
    expect(rows[5].equipmentTag).toBe("WS-1");
  });

  it("refuses a bad header on line 1 and reads no rows", () => {
    for (const header of [
      "equipment,kind,quantity,unit,expected_interval_s,low_limit,high_limit",
      "equipment_tag,equipment_kind,quantity,unit,expected_interval_s,low_limit",
      "equipment_kind,equipment_tag,quantity,unit,expected_interval_s,low_limit,high_limit",
      "",
    ]) {
      const { rows, errors } = parsePointListCsv(`${header}\nCH-1,chiller,run_status,bool,5,,`);
      expect(rows).toEqual([]);
      expect(errors).toHaveLength(1);
      expect(errors[0]).toMatchObject({ line: 1, column: null });
      expect(errors[0].message).toMatch(/header must be exactly/);
    }
  });

  it("reports each bad row by line and column, and keeps counting lines past blank ones", () => {
    const text = [
      HEADER,
      "CH-1,chiller,chilled_water_leaving_temp,degF,5,38,60", // 2 good
      "", // 3 blank
      "CH-1,chiller,not_a_quantity,degC,5,,", // 4
      "CH-1,chiller,chilled_water_entering_temp,psig,5,,", // 5 unit cannot measure temperature
      "CH-1,chiller,chilled_water_flow,gpm,five,,", // 6 interval
      "CH-1,chiller,compressor_power,kW,5,abc,", // 7 low limit
      "CH-1,chiller,compressor_speed,%,5,90,10", // 8 low > high
      "CH-1,chiller,fan_speed,%,5,,", // 9 a chiller has no fan_speed
      "CH-1,boiler,run_status,bool,5,,", // 10 unknown kind
      "CH-1,chiller,run_status,bool,5,0,1", // 11 limits on a boolean
      "CH-1,chiller,drive_temp,degC,5", // 12 six fields
      "CH-1,chiller,drive_temp,degC,0,,", // 13 interval 0
      ",chiller,drive_temp,degC,5,,", // 14 empty tag
    ].join("\n");
    const { rows, errors } = parsePointListCsv(text);
    expect(rows.map((r) => r.line)).toEqual([2]);
    const at = (line: number) => errors.filter((e) => e.line === line);
    expect(at(3)).toEqual([]);
    expect(at(4)).toEqual([{ line: 4, column: "quantity", message: 'unknown quantity "not_a_quantity"' }]);
    expect(at(5)[0]).toMatchObject({ column: "unit" });
    expect(at(5)[0].message).toMatch(/cannot measure temperature/);
    expect(at(6)[0]).toMatchObject({ column: "expected_interval_s" });
    expect(at(7)[0]).toMatchObject({ column: "low_limit" });
    expect(at(8)[0]).toMatchObject({ column: "high_limit", message: "high_limit is below low_limit" });
    expect(at(9)[0]).toMatchObject({ column: "quantity" });
    expect(at(9)[0].message).toMatch(/chiller has no fan_speed/);
    expect(at(10)[0]).toMatchObject({ column: "equipment_kind" });
    expect(at(11).map((e) => e.column)).toEqual(["low_limit", "high_limit"]);
    expect(at(12)[0]).toMatchObject({ column: null, message: "expected 7 fields, found 5" });
    expect(at(13)[0]).toMatchObject({ column: "expected_interval_s" });
    expect(at(14)[0]).toMatchObject({ column: "equipment_tag" });
  });

  it("refuses a second row for the same equipment tag and quantity, naming the first line", () => {
    const text = [
      HEADER,
      "CH-1,chiller,drive_temp,degC,5,,80",
      "CH-2,chiller,drive_temp,degC,5,,80",
      "CH-1,chiller,drive_temp,degF,5,,176",
    ].join("\n");
    const { rows, errors } = parsePointListCsv(text);
    expect(rows).toHaveLength(2);
    expect(errors).toEqual([{ line: 4, column: "quantity", message: "CH-1 drive_temp is already on line 2" }]);
  });

  it("refuses one tag given two kinds in the same file", () => {
    const text = [HEADER, "P-1,pump,pump_status,bool,5,,", "P-1,air_handler,run_status,bool,5,,"].join("\n");
    const { errors } = parsePointListCsv(text);
    expect(errors).toHaveLength(1);
    expect(errors[0]).toMatchObject({ line: 3, column: "equipment_kind" });
  });

  it("validates 5,000 rows quickly", () => {
    // 200 chillers × 25 of the chiller's points (lib/quantities.ts) = 5,000 rows.
    const lines = [HEADER];
    for (let c = 1; c <= 200; c++)
      for (const q of pointsByKind.chiller.filter((k) => k !== "chiller_stop_reason").slice(0, 25))
        lines.push(`CH-${c},chiller,${q},${unitFor(q)},5,,`);
    expect(lines.length - 1).toBe(5000);
    const t0 = performance.now();
    const { rows, errors } = parsePointListCsv(lines.join("\r\n"));
    const ms = performance.now() - t0;
    expect(errors).toEqual([]);
    expect(rows).toHaveLength(5000);
    // Generous on a shared 2-core machine: a person waiting on an upload notices a second.
    expect(ms).toBeLessThan(1000);
  });

  it("reads back what formatPointListCsv writes", () => {
    const { rows } = parsePointListCsv(good);
    const again = parsePointListCsv(formatPointListCsv(rows.map((r) => ({ ...r, unit: r.canonicalUnit }))));
    expect(again.errors).toEqual([]);
    expect(again.rows.map((r) => [r.equipmentTag, r.quantity, r.lowLimit, r.highLimit])).toEqual(
      rows.map((r) => [r.equipmentTag, r.quantity, r.lowLimit, r.highLimit]),
    );
  });
});

function unitFor(q: string): string {
  if (q.endsWith("_temp") || q.endsWith("setpoint")) return "degC";
  if (q.endsWith("_dp")) return "kPad";
  if (q.endsWith("pressure")) return "kPa";
  if (q.endsWith("flow")) return "L/s";
  if (q === "compressor_power") return "kW";
  if (q === "compressor_speed" || q === "inlet_guide_vane_position") return "%";
  if (q === "fault_text") return "text";
  if (q.endsWith("time_left") || q.endsWith("timer_setting")) return "s";
  return "bool";
}

describe("point-list plan", () => {
  const equipment: ExistingEquipment[] = [
    { id: "e-ch1", tag: "CH-1", kind: "chiller", retired: false },
    { id: "e-ct1", tag: "CT-1", kind: "cooling_tower", retired: false },
    { id: "e-old", tag: "CH-9", kind: "chiller", retired: true },
  ];
  const points: ExistingPoint[] = [
    {
      id: 1,
      equipmentId: "e-ch1",
      quantity: "drive_temp",
      unit: "degC",
      expectedIntervalS: 5,
      lowLimit: null,
      highLimit: 80,
    },
    {
      id: 2,
      equipmentId: "e-ch1",
      quantity: "run_status",
      unit: "bool",
      expectedIntervalS: 5,
      lowLimit: null,
      highLimit: null,
    },
  ];

  it("sorts rows into create, update and unchanged, with before and after", () => {
    const { rows } = parsePointListCsv(
      [
        HEADER,
        "CH-1,chiller,drive_temp,degF,5,,176", // 176 °F = 80 °C: unchanged after conversion
        "CH-1,chiller,run_status,bool,10,,", // interval changed
        "CT-1,cooling_tower,fan_speed,%,5,0,100", // new
      ].join("\n"),
    );
    const { plan, errors } = planPointList(rows, equipment, points);
    expect(errors).toEqual([]);
    expect(plan.counts).toEqual({ create: 1, update: 1, unchanged: 1 });
    expect(plan.items.map((i) => [i.line, i.action, i.pointId])).toEqual([
      [2, "unchanged", 1],
      [3, "update", 2],
      [4, "create", null],
    ]);
    expect(plan.items[1].before?.expectedIntervalS).toBe(5);
    expect(plan.items[1].after.expectedIntervalS).toBe(10);
  });

  it("reports unknown, retired and differently-kinded equipment by line", () => {
    const { rows } = parsePointListCsv(
      [
        HEADER,
        "AHU-7,air_handler,run_status,bool,5,,",
        "CH-9,chiller,run_status,bool,5,,",
        "CT-1,pump,pump_status,bool,5,,",
      ].join("\n"),
    );
    const { plan, errors } = planPointList(rows, equipment, points);
    expect(plan.items).toEqual([]);
    expect(errors).toEqual([
      { line: 2, column: "equipment_tag", message: 'no equipment "AHU-7" at this site' },
      { line: 3, column: "equipment_tag", message: "CH-9 is retired" },
      { line: 4, column: "equipment_kind", message: "CT-1 is a cooling_tower at this site, not a pump" },
    ]);
  });
});
