import { describe, expect, it } from "vitest";
import {
  computeSiteSnapshot,
  latestFromReadings,
  restartLockoutLeft,
  waterLoadKw,
  type Reading,
  type Site,
} from "@/lib/plant";

const T0 = Date.UTC(2025, 6, 1, 14, 0, 0);

describe("restart lockout left", () => {
  it("prefers the controller's countdown and counts it down since it was read", () => {
    const r = restartLockoutLeft({
      nowMs: T0 + 30_000,
      inhibitLeftS: { value: 600, tsMs: T0 },
      lastStopMs: T0,
      stopToStartS: 60,
    });
    expect(r).toEqual({ lockoutLeftS: 570, source: "controller" });
  });

  it("else takes the later of start-to-start and stop-to-start from the last start and stop", () => {
    // Started at T0, stopped 5 min later: start-to-start 20 min ends at T0+20 min, stop-to-start 5 min at T0+10 min.
    const r = restartLockoutLeft({
      nowMs: T0 + 6 * 60_000,
      lastStartMs: T0,
      lastStopMs: T0 + 5 * 60_000,
      startToStartS: 1200,
      stopToStartS: 300,
    });
    expect(r.source).toBe("timers");
    expect(r.lockoutLeftS).toBeCloseTo(14 * 60, 6);
  });

  it("never goes negative, and says when it cannot know", () => {
    expect(restartLockoutLeft({ nowMs: T0 + 3600_000, lastStartMs: T0, startToStartS: 1200 }).lockoutLeftS).toBe(0);
    expect(restartLockoutLeft({ nowMs: T0 }).source).toBe("unknown");
  });
});

describe("site snapshot", () => {
  const site: Site = [
    { tag: "CH-1", kind: "chiller", capacityTons: 700, designFlowLps: 100 },
    { tag: "CT-1", kind: "cooling_tower" },
    { tag: "CHWP-1", kind: "pump", serves: "CH-1" },
    { tag: "WS-1", kind: "weather_station" },
  ];
  const r = (quantity: Reading["quantity"], value: Reading["value"], equipment = "CH-1", tsMs = T0): Reading => ({
    tsMs,
    equipment,
    quantity,
    value,
  });
  const base: Reading[] = [
    r("run_status", true),
    r("chilled_water_entering_temp", 12.5),
    r("chilled_water_leaving_temp", 7),
    r("condenser_water_entering_temp", 29.4, "CH-1", T0 - 5000),
    r("condenser_water_leaving_temp", 34.6),
    r("compressor_power", 400),
    r("condenser_saturated_temp", 35.7),
    r("evaporator_saturated_temp", 6.2),
    r("condenser_refrigerant_pressure", 900),
    r("evaporator_refrigerant_pressure", 360),
    r("condenser_water_entering_temp", 34.6, "CT-1"),
    r("condenser_water_leaving_temp", 29.4, "CT-1"),
    r("outdoor_wet_bulb_temp", 25.5, "WS-1"),
  ];

  it("computes load from design flow while the pump is proven (SI form, REFERENCES.md §2)", () => {
    const latest = latestFromReadings([...base, r("pump_status", true, "CHWP-1")]);
    const c = computeSiteSnapshot(site, latest, T0).chillers[0];
    expect(c.flowSource).toBe("design");
    expect(c.loadKw).toBeCloseTo(waterLoadKw(100, 5.5), 6);
    expect(Math.abs(c.loadTons! - 654.7)).toBeLessThan(0.1); // REFERENCES.md §2 worked example
    expect(c.kwPerTon).toBeCloseTo(400 / 654.7, 3);
    expect(c.liftK).toBeCloseTo(29.5, 6);
    expect(c.pressureLiftKPa).toBe(540);
    expect(c.condenserApproachK).toBeCloseTo(1.1, 6);
    expect(c.evaporatorApproachK).toBeCloseTo(0.8, 6);
    expect(c.crossoverMarginK).toBeCloseTo(16.9, 6);
    expect(c.crossoverPressureMarginKPa).toBe(540);
    expect(c.inputsFromMs).toBe(T0 - 5000);
    const t = computeSiteSnapshot(site, latest, T0).towers[0];
    expect(t.rangeK).toBeCloseTo(5.2, 6);
    expect(t.approachK).toBeCloseTo(3.9, 6);
  });

  it("derives saturated temperatures from the shells' pressures and wet bulb from dry bulb and humidity when the site has no such points", () => {
    const bare = base.filter(
      (x) =>
        !["condenser_saturated_temp", "evaporator_saturated_temp", "outdoor_wet_bulb_temp"].includes(x.quantity) &&
        x.quantity !== "condenser_refrigerant_pressure" &&
        x.quantity !== "evaporator_refrigerant_pressure",
    );
    // R-134a: 957.35 kPa abs ↔ 100 °F (37.78 °C), 342.95 kPa abs ↔ 40 °F (4.44 °C) (REFERENCES.md, NIST table [K]).
    const latest = latestFromReadings([
      ...bare,
      r("condenser_refrigerant_pressure", 957.35),
      r("evaporator_refrigerant_pressure", 342.95),
      // PsychroLib's documented example (REFERENCES.md §psychrometrics [K]): 25 °C, RH 20 % → wet bulb 12.513 °C.
      r("outdoor_air_temp", 25, "WS-1"),
      r("outdoor_air_humidity", 20, "WS-1"),
    ]);
    const snap = computeSiteSnapshot(site, latest, T0);
    expect(snap.chillers[0].liftK).toBeCloseTo(37.78 - 4.44, 1);
    expect(snap.wetBulbC).toBeCloseTo(12.513, 2);
  });

  it("gives no load from design flow when the pump is not proven", () => {
    const c = computeSiteSnapshot(site, latestFromReadings([...base, r("pump_status", false, "CHWP-1")]), T0)
      .chillers[0];
    expect(c.loadKw).toBeNull();
    expect(c.kwPerTon).toBeNull();
  });

  it("prefers measured flow", () => {
    const c = computeSiteSnapshot(site, latestFromReadings([...base, r("chilled_water_flow", 50)]), T0).chillers[0];
    expect(c.flowSource).toBe("measured");
    expect(c.loadKw).toBeCloseTo(waterLoadKw(50, 5.5), 6);
  });

  it("uses the tower's leaving water for the margin when the chiller has no condenser-entering sensor", () => {
    const c = computeSiteSnapshot(
      site,
      latestFromReadings(
        base.filter((x) => !(x.equipment === "CH-1" && x.quantity === "condenser_water_entering_temp")),
      ),
      T0,
    ).chillers[0];
    expect(c.crossoverMarginK).toBeCloseTo(16.9, 6);
  });

  // A stopped chiller's shell pressures are the most direct reading of a crossover: kept, not dropped.
  it("reports the pressure margin while stopped too", () => {
    const c = computeSiteSnapshot(site, latestFromReadings([...base, r("run_status", false, "CH-1", T0 + 1)]), T0 + 1)
      .chillers[0];
    expect(c.crossoverPressureMarginKPa).not.toBeNull();
    expect(c.crossoverMarginK).not.toBeNull();
  });
});
