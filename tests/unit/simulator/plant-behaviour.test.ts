import { describe, expect, it } from "vitest";
import { chillerLimitDefaults } from "@/lib/plant/equipment-limits";
import { quantities } from "@/lib/quantities";
import { defaultLayout, getLayout, initialState, scenarioNames, step, type PlantState } from "@/simulator";
import { deadLegTauS, headHoldFraction, minLiftDelayS, minLiftStartupS } from "@/simulator/chiller";
import { cToF, record } from "./helpers";

// Every check on event (scenario) time, the simulator run headless.
const fToC = (f: number) => ((f - 32) * 5) / 9;
const calm = { dryBulbC: fToC(60), rhPct: 60, loadFraction: 0.6, ahusScheduled: 4, coilAirC: fToC(65), commands: [] };

/** A plant run at steady inputs for `s` seconds in 1 s steps. */
function run(s0: PlantState, seconds: number, inputs = calm): PlantState {
  let s = s0;
  for (let t = 0; t < seconds; t++) s = step(s, inputs, 1).state;
  return s;
}

describe("mild-day scenario (a mild spring day, office load)", () => {
  it("is in the scenario list the CLI, API and drill page read", () => {
    expect(scenarioNames).toContain("mild-day");
  });
  for (const site of ["default", "medical-office", "school"]) {
    const r = record({
      scenario: "mild-day",
      seed: 3,
      durationS: 24 * 3600,
      sampleEveryS: 60,
      layout: getLayout(site),
    });
    it(`${site}: 48–68 °F dry bulb, the chiller cycles on low load overnight, restarts by itself, loops never cross`, () => {
      const db = r.num("WS-1", "outdoor_air_temp").v.map(cToF);
      expect(Math.min(...db)).toBeGreaterThan(47);
      expect(Math.max(...db)).toBeLessThan(69);
      const reason = r.get("CH-1", "chiller_stop_reason");
      const night = reason.v.filter((_, i) => reason.t[i] < 5 * 3600);
      expect(night).toContain("low_load");
      expect(night).toContain("running");
      expect(reason.v).not.toContain("trip");
      expect(r.events.filter((e) => e.kind === "alarm")).toEqual([]);
      const cw = r.num("CT-1", "condenser_water_leaving_temp");
      const chw = r.num("CH-1", "chilled_water_entering_temp");
      const closestF = Math.min(...cw.v.map((v, i) => cToF(v) - cToF(chw.v[i])));
      expect(closestF).toBeGreaterThan(0);
    });
    it(`${site}: no start comes sooner than the 15-min start-to-start timer after the one before`, () => {
      const starts = r.events.filter((e) => e.equipment === "CH-1" && /Compressor started/.test(e.message));
      for (let i = 1; i < starts.length; i++)
        expect(starts[i].tsMs - starts[i - 1].tsMs).toBeGreaterThanOrEqual(900_000);
    });
  }
});

describe("pump command and fault points", () => {
  it("quantity vocabulary has them with Brick classes (Start_Stop_Command, Fault_Status)", () => {
    expect(quantities.pump_run_command.brickClass).toBe("Start_Stop_Command");
    expect(quantities.pump_fault.brickClass).toBe("Fault_Status");
  });
  it("condenser-pump-loss: CWP-1 commanded on but not proven (command true, status false, fault true)", () => {
    const r = record({ scenario: "condenser-pump-loss", seed: 1, durationS: 30 * 60, sampleEveryS: 30 });
    const at = (q: string) => r.get("CWP-1", q).v[r.get("CWP-1", q).t.findIndex((t) => t >= 25 * 60)];
    expect(at("pump_run_command")).toBe(true);
    expect(at("pump_status")).toBe(false);
    expect(at("pump_fault")).toBe(true);
    expect(r.get("CHWP-1", "pump_run_command").v[0]).toBe(true);
  });
});

describe("chiller stop reason", () => {
  it("a latched trip reads trip; a disabled chiller reads manual", () => {
    const r = record({ scenario: "condenser-pump-loss", seed: 1, durationS: 30 * 60, sampleEveryS: 30 });
    expect(r.get("CH-1", "chiller_stop_reason").v.at(-1)).toBe("trip");
    const pb = record({ scenario: "power-blip", seed: 1, durationS: 60, sampleEveryS: 30 });
    expect(pb.get("CH-2", "chiller_stop_reason").v.at(-1)).toBe("manual");
  });
});

describe("condenser-water sensor on a stopped loop reads a dead leg", () => {
  it(`drifts toward the plant room (time constant ${deadLegTauS} s), not the basin`, () => {
    const r = record({ scenario: "condenser-pump-loss", seed: 1, durationS: 60 * 60, sampleEveryS: 30 });
    const ecwt = r.num("CH-1", "condenser_water_entering_temp");
    const basin = r.num("CT-1", "condenser_water_leaving_temp");
    const i = ecwt.t.findIndex((t) => t >= 55 * 60);
    const room = 85; // params.ts mechanicalRoomF
    expect(Math.abs(cToF(ecwt.v[i]) - room)).toBeLessThan(Math.abs(cToF(basin.v[i]) - room));
    expect(Math.abs(cToF(ecwt.v[i]) - room)).toBeLessThan(3);
  });
});

describe("tower bypass valve", () => {
  it("exists only where the layout has one", () => {
    expect(getLayout("data-hall")?.towerBypass).toBe(true);
    const r = record({
      scenario: "normal-day",
      seed: 1,
      durationS: 60,
      sampleEveryS: 30,
      layout: getLayout("data-hall"),
    });
    expect(r.get("CT-1", "tower_bypass_valve_position").v[0]).toBe(0);
    const d = record({ scenario: "normal-day", seed: 1, durationS: 60, sampleEveryS: 30 });
    expect(d.series.has("CT-1|tower_bypass_valve_position")).toBe(false);
  });
  it("opening it holds condenser water up (less cooling over the fill); refused where there is none", () => {
    const layout = getLayout("data-hall")!;
    // Fan off in both runs, so that the fan's own control does not take back what the bypass gives.
    const fanOff = {
      atS: 30,
      action: { type: "set-fan-drive-mode" as const, equipment: "CT-1", mode: "off" as const },
    };
    const closed = record({
      scenario: "slow-crossover",
      seed: 1,
      durationS: 2 * 3600,
      sampleEveryS: 60,
      layout,
      actions: [fanOff],
    });
    const open = record({
      scenario: "slow-crossover",
      seed: 1,
      durationS: 2 * 3600,
      sampleEveryS: 60,
      layout,
      actions: [fanOff, { atS: 60, action: { type: "set-tower-bypass", equipment: "CT-1", positionPct: 80 } }],
    });
    expect(open.events.some((e) => e.kind === "action" && /bypass/.test(e.message))).toBe(true);
    const last = (r: typeof open) => r.num("CT-1", "condenser_water_leaving_temp").v.at(-1) as number;
    expect(cToF(last(open)) - cToF(last(closed))).toBeGreaterThan(2);
    const none = record({
      scenario: "slow-crossover",
      seed: 1,
      durationS: 120,
      sampleEveryS: 60,
      actions: [{ atS: 60, action: { type: "set-tower-bypass", equipment: "CT-1", positionPct: 80 } }],
    });
    expect(none.events.some((e) => e.kind === "action-refused" && /no tower bypass/.test(e.message))).toBe(true);
  });
});

describe("condenser loop volume", () => {
  it("7 gal/ton, inside the usual 5–10 gal/ton (recalled, not verified)", () => {
    expect(defaultLayout.cwLoopGalPerTon).toBeGreaterThanOrEqual(5);
    expect(defaultLayout.cwLoopGalPerTon).toBeLessThanOrEqual(10);
  });
});

describe("head-pressure limit ahead of the cut-out (hold > 90 %, unload > 95 %: common practice, recalled)", () => {
  it("power-blip: the controller holds, then unloads, before the trip — compressor kW falls ahead of it", () => {
    const r = record({ scenario: "power-blip", seed: 7, durationS: 90 * 60, sampleEveryS: 10 });
    const trip = r.events.find((e) => e.kind === "alarm" && /High condenser pressure/.test(e.message));
    const hold = r.events.find((e) => /High condenser pressure limit/.test(e.message));
    expect(hold).toBeDefined();
    expect(trip).toBeDefined();
    expect(hold!.tsMs).toBeLessThan(trip!.tsMs);
    const kw = r.num("CH-1", "compressor_power");
    const startMs = Date.UTC(2026, 5, 1);
    const holdS = (hold!.tsMs - startMs) / 1000;
    const tripS = (trip!.tsMs - startMs) / 1000;
    const atHold = kw.v[kw.t.findIndex((t) => t >= holdS)];
    const beforeTrip = kw.v[kw.t.findIndex((t) => t >= tripS - 30)];
    expect(beforeTrip).toBeLessThan(0.9 * atHold);
    expect(headHoldFraction).toBeCloseTo(0.9);
  });
});

describe("minimum-lift safety", () => {
  it("default minimum from chillerLimitDefaults (≈ 70 kPa for a refrigerant-cooled oil-free compressor, recalled)", () => {
    const s = initialState(defaultLayout, 1, calm);
    expect(s.params.chillers[0].minLiftKPa).toBe(
      chillerLimitDefaults("R-134a", "centrifugal_vsd_oil_free").minStartLiftKPa.value,
    );
  });
  it("stops a running compressor whose pressure difference stays below the minimum, and says so", () => {
    // Condenser water forced below the evaporating temperature: the lift collapses while the chiller runs.
    let s = run(initialState(defaultLayout, 1, calm), 1200);
    expect(s.chillers[0].running).toBe(true);
    const events: string[] = [];
    for (let t = 0; t < minLiftStartupS + minLiftDelayS + 600; t++) {
      s = { ...s, basinC: s.chillers[0].evapSatC - 4 };
      const r = step(s, calm, 1);
      s = r.state;
      events.push(...r.events.map((e) => e.message));
    }
    expect(
      events.some((m) =>
        /Low lift: condenser − evaporator pressure difference .* below the 10\.2 psid minimum/.test(m),
      ),
    ).toBe(true);
    expect(s.chillers[0].stopReason === "safety" || s.chillers[0].running).toBe(true);
  });
});

describe("restart into crossed loops (power-blip, late reset)", () => {
  it("the evaporator starves: suction falls, leaving chilled water drops little, the drive heats", () => {
    const r = record({ scenario: "power-blip", seed: 7, durationS: 4 * 3600, sampleEveryS: 10 });
    const startMs = Date.UTC(2026, 5, 1);
    const restart = r.events.find((e) => /Compressor started/.test(e.message) && e.tsMs - startMs > 160 * 60_000);
    expect(restart).toBeDefined();
    const t0 = (restart!.tsMs - startMs) / 1000;
    const at = (q: string, t: number) => {
      const s = r.num("CH-1", q);
      return s.v[s.t.findIndex((x) => x >= t)];
    };
    expect(at("evaporator_refrigerant_pressure", t0 + 120)).toBeLessThan(
      at("evaporator_refrigerant_pressure", t0 - 10),
    );
    expect(
      cToF(at("chilled_water_entering_temp", t0 + 120)) - cToF(at("chilled_water_leaving_temp", t0 + 120)),
    ).toBeLessThan(4);
    expect(cToF(at("drive_temp", t0 + 180))).toBeGreaterThan(cToF(at("drive_temp", t0)) + 10);
  });
});
