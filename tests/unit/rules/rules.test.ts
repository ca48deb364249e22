// Rule checks on synthetic event-time streams (tests/unit/rules/synthetic.ts). Thresholds are
// the documented defaults of lib/rules/settings.ts unless a test says otherwise.
import { describe, expect, it } from "vitest";
import { saturationPressureKPa } from "@/lib/refrigerant";
import { renderQuantities } from "@/lib/quantity-text";
import { runFrames, secondsOf, withChillerLimits, type Frame } from "./synthetic";

/**
 * Chiller off while the building still calls for cooling; margin closes 0.3 K/min from 11.8 K → crosses at ≈ 39.3 min.
 * Each stopped shell's refrigerant sits at the saturation pressure of its water (R-134a), as in a real idle chiller.
 */
const closingOff =
  (inhibitLeftAt: (tS: number) => number | null = () => null) =>
  (tS: number): Partial<Frame> => {
    const chw = 12.2 + (0.15 / 60) * tS;
    const cw = 24 - (0.15 / 60) * tS;
    return {
      running: false,
      chwInC: chw,
      chwOutC: chw,
      cwInC: cw,
      cwOutC: cw,
      evapKPa: saturationPressureKPa("R-134a", chw),
      condKPa: saturationPressureKPa("R-134a", cw),
      inhibitLeftS: inhibitLeftAt(tS),
    };
  };
const crossingS = 11.8 / (0.3 / 60);
/** These checks measure to the loops' crossing itself: a chiller whose record asks no start margin. */
const zeroLift = withChillerLimits({ minStartLiftKPa: 0 });
/** Tripped on a latched alarm: held off until someone resets it. */
const tripped = { chillerAlarm: true, faultText: "High discharge pressure trip at 160.1 psig" };

describe("crossover risk (rule 1)", () => {
  it("warns when the projected crossover is under 30 min, well before the loops cross", () => {
    const r = runFrames({ site: zeroLift, durationS: 3000, frame: (tS) => ({ ...closingOff()(tS), ...tripped }) });
    const first = secondsOf(r.firstActivation("crossover_risk:CH-1"));
    expect(first).not.toBeNull();
    // Held by its trip, the chiller is back on load at the earliest after the 1800 s reset allowance + 300 s to
    // load: the restart race is lost once ttc < 2100 s (t ≈ 260 s), sooner than the 30 min horizon, and the
    // warning rises with it (plus its 30 s on-delay) so a critical page never comes without it.
    expect(first!).toBeGreaterThanOrEqual(crossingS - 2100);
    expect(first!).toBeLessThanOrEqual(crossingS - 2100 + 60);
    expect(secondsOf(r.firstActivation("restart_race:CH-1"))!).toBeLessThanOrEqual(first!);
    expect(crossingS - first!).toBeGreaterThanOrEqual(600);
    expect(r.activations("crossover_risk:CH-1")).toBe(1);
  });

  it("carries the derived numbers it rests on: margin, time to crossover with its band, closing rate", () => {
    const r = runFrames({
      site: zeroLift,
      durationS: 900,
      frame: (tS) => ({ ...closingOff()(tS), ...tripped }),
      keep: true,
    });
    const c = r.evaluations.at(-1)!.conditions.find((x) => x.ruleId === "crossover_risk")!;
    expect(c.active).toBe(true);
    expect(c.numbers.marginK).toBeCloseTo(11.8 - 0.3 * 15, 1);
    expect(c.numbers.timeToCrossoverS).toBeCloseTo(crossingS - 900, -1);
    expect(c.numbers.closingRateKPerMin).toBeCloseTo(0.3, 2);
    expect(c.caution).toMatch(/qualified technicians/);
    expect(c.technicianMessage).toMatch(/CH-1/);
    expect(c.ownerMessage).not.toMatch(/K\/min/);
  });

  /** Running, condenser water drifting down 1 K/h; each shell 2 K from its water, so the lift tracks the water margin. */
  const slowDrift = (tS: number): Partial<Frame> => {
    const cw = 12.2 + 4.5 - tS / 3600;
    return {
      cwInC: cw,
      // The leaving water follows the entering water (a flat one beside it would read as a frozen sensor).
      cwOutC: cw + 5.2,
      towerInC: cw + 5.2,
      condKPa: saturationPressureKPa("R-134a", cw + 2),
      evapKPa: saturationPressureKPa("R-134a", 12.2 + 2),
    };
  };
  it("sees a slow drift with the long fit: a small margin closing 1 K/h warns once under 3 K", () => {
    // Running chiller, condenser water drifting down on a cold day: margin 4.5 K → 0 over 4.5 h.
    const r = runFrames({ site: zeroLift, durationS: 3 * 3600, stepS: 20, frame: slowDrift });
    const first = secondsOf(r.firstActivation("crossover_risk:CH-1"));
    expect(first).not.toBeNull();
    // Under 3 K from 1.5 h; the short fit alone sees 0.017 K/min as noise.
    expect(first!).toBeGreaterThanOrEqual(1.5 * 3600);
    expect(first!).toBeLessThanOrEqual(1.5 * 3600 + 120);
    const short = runFrames({
      site: zeroLift,
      durationS: 3 * 3600,
      stepS: 20,
      frame: slowDrift,
      settings: { crossoverRisk: { slowFitWindowS: 600 } },
    });
    expect(short.firstActivation("crossover_risk:CH-1")).toBeNull();
  });

  it("stays quiet on an opening margin", () => {
    const r = runFrames({
      site: zeroLift,
      durationS: 3000,
      frame: (tS) => ({
        ...closingOff()(tS),
        chwInC: 12.2 - (0.1 / 60) * tS,
        cwInC: 20,
        evapKPa: saturationPressureKPa("R-134a", 12.2 - (0.1 / 60) * tS),
        condKPa: saturationPressureKPa("R-134a", 20),
      }),
    });
    expect(r.firstActivation("crossover_risk:CH-1")).toBeNull();
  });

  it("stays quiet when the plant is switched off (no call for cooling)", () => {
    const r = runFrames({ site: zeroLift, durationS: 3000, frame: (tS) => ({ ...closingOff()(tS), enabled: false }) });
    expect(r.firstActivation("crossover_risk:CH-1")).toBeNull();
    expect(r.firstActivation("loops_crossed:CH-1")).toBeNull();
  });
});

describe("restart race (rule 2)", () => {
  it("fires while the anti-recycle timer still runs when the loops will cross before a restart can be on load", () => {
    // 40-min lockout counting down from t = 0: back on load after 2400 + 300 s; crossover in 2360 s — lost from
    // the start (a 30-min lockout would be back on load 260 s before the crossing: no race, see the trust tests).
    const r = runFrames({
      site: zeroLift,
      durationS: 1200,
      frame: closingOff((tS) => Math.max(0, 2400 - tS)),
      keep: true,
    });
    const first = secondsOf(r.firstActivation("restart_race:CH-1"));
    expect(first).not.toBeNull();
    const e = r.evaluations.find((x) => x.atMs === r.firstActivation("restart_race:CH-1"))!;
    const c = e.conditions.find((x) => x.ruleId === "restart_race")!;
    // The short fit needs its first minute of samples.
    expect(first!).toBeLessThanOrEqual(90);
    expect(c.numbers.lockoutLeftS).toBeGreaterThan(0);
    // The restart is far: keep the condenser water up and take load off first.
    expect(c.advice[0]).toMatch(/Keep the condenser water up/);
    expect(c.advice.join(" ")).toMatch(/air handlers/);
    expect(c.advice.join(" ")).toMatch(/within the manufacturer's limits.*supervision.*put them back/);
    expect(c.caution).toMatch(/manufacturer's procedures, local codes and licensed practice/);
  });

  it("does not fire when the lockout ends early enough, until the crossover itself gets close", () => {
    // Lockout 60 s: the race is on only once ttc < 60 + 300 s.
    const r = runFrames({ site: zeroLift, durationS: 3000, frame: closingOff((tS) => Math.max(0, 60 - tS)) });
    const first = secondsOf(r.firstActivation("restart_race:CH-1"));
    expect(first).not.toBeNull();
    expect(first!).toBeGreaterThan(crossingS - 400);
  });

  it("a latched alarm holds the restart until someone resets it: the race counts the 30 min allowed to reach and reset it", () => {
    const r = runFrames({
      site: zeroLift,
      durationS: 900,
      frame: (tS) => ({
        ...closingOff(() => 0)(tS),
        chillerAlarm: true,
        faultText: "High discharge pressure trip at 160.1 psig",
      }),
      keep: true,
    });
    const first = secondsOf(r.firstActivation("restart_race:CH-1"));
    expect(first).not.toBeNull();
    // Back on load after max(0, 1800) + 300 s; crossover in 2360 s → race from t ≈ 260 s.
    expect(first!).toBeGreaterThanOrEqual(250);
    expect(first!).toBeLessThanOrEqual(280);
    const c = r.evaluations.at(-1)!.conditions.find((x) => x.ruleId === "restart_race")!;
    expect(c.technicianMessage).toMatch(/held off.*until someone resets it/);
    expect(c.advice.join(" ")).toMatch(/hand reset at the device/);
  });

  it("reads the controller's stop reason: a trip is latched (waits for a reset), a safety resets itself", () => {
    // Trip reported with no latched-alarm point: held, so the 30 min reset allowance counts (race from ≈ 260 s,
    // as above).
    const trip = runFrames({
      site: zeroLift,
      durationS: 900,
      frame: (tS) => ({ ...closingOff(() => 0)(tS), stopReason: "trip" }),
      keep: true,
    });
    const tripFirst = secondsOf(trip.firstActivation("restart_race:CH-1"));
    expect(tripFirst).not.toBeNull();
    expect(tripFirst!).toBeLessThanOrEqual(280);
    expect(trip.evaluations.at(-1)!.conditions.find((x) => x.ruleId === "restart_race")!.numbers.latchedAlarm).toBe(1);
    // A drive fault with the controller reporting a safety stop: it restarts by itself when the 60 s timer
    // allows, so no race until the crossing is within the time to load (as for a plain lockout).
    const safety = runFrames({
      site: zeroLift,
      durationS: 3000,
      frame: (tS) => ({ ...closingOff((t) => Math.max(0, 60 - t))(tS), driveFault: true, stopReason: "safety" }),
    });
    const first = secondsOf(safety.firstActivation("restart_race:CH-1"));
    expect(first).not.toBeNull();
    expect(first!).toBeGreaterThan(crossingS - 400);
    // Stopped on low load or by the schedule with its timers run out, it starts when the load calls: there is
    // no timer to race, so no critical race alarm at all (the crossing itself is loops_crossed's).
    for (const stopReason of ["low_load", "schedule"]) {
      const auto = runFrames({
        site: zeroLift,
        durationS: 3000,
        frame: (tS) => ({ ...closingOff((t) => Math.max(0, 60 - t))(tS), stopReason }),
      });
      expect(auto.firstActivation("restart_race:CH-1"), stopReason).toBeNull();
      expect(auto.firstActivation("loops_crossed:CH-1"), stopReason).not.toBeNull();
    }
    // Without the stop-reason point the same drive fault is taken as held.
    const noPoint = runFrames({
      site: zeroLift,
      durationS: 900,
      frame: (tS) => ({ ...closingOff((t) => Math.max(0, 60 - t))(tS), driveFault: true }),
    });
    expect(secondsOf(noPoint.firstActivation("restart_race:CH-1"))!).toBeLessThanOrEqual(280);
  });

  it("a chiller stopped by hand waits for someone to enable it: says so instead of a reset", () => {
    const r = runFrames({
      site: zeroLift,
      durationS: 900,
      frame: (tS) => ({ ...closingOff(() => 0)(tS), stopReason: "manual" }),
      keep: true,
    });
    const c = r.evaluations.at(-1)!.conditions.find((x) => x.ruleId === "restart_race")!;
    expect(c.active).toBe(true);
    expect(c.technicianMessage).toMatch(/until someone enables it again/);
    expect(c.advice.join(" ")).toMatch(/stopped by hand/);
  });

  it("does not fire while the chiller runs", () => {
    const r = runFrames({
      site: zeroLift,
      durationS: 1500,
      frame: (tS) => ({ ...closingOff(() => 1800)(tS), running: true }),
    });
    expect(r.firstActivation("restart_race:CH-1")).toBeNull();
  });

  it("falls back to the chiller record's timer settings and the last stop when no countdown is reported", () => {
    // Stopped at t = 60 s after running; the record's stop-to-start 300 s, start-to-start 1200 s from… no start seen → stop-to-start only.
    const r = runFrames({
      site: withChillerLimits({ stopToStartS: 300, startToStartS: 1200 }),
      durationS: 600,
      frame: (tS) =>
        tS < 60
          ? { inhibitLeftS: null }
          : { ...closingOff(() => null)(tS), chwInC: 12.2 + (1 / 60) * tS, cwInC: 20 - (1 / 60) * tS },
      keep: true,
    });
    const c = r.evaluations
      .find((x) => x.atMs === r.evaluations[0].atMs + 120_000)!
      .conditions.find((x) => x.ruleId === "restart_race")!;
    expect(c.numbers.lockoutLeftS).toBeCloseTo(240, 0);
  });
});

describe("loops crossed (rule 3)", () => {
  it("alarms once the margin reaches zero, after its 30 s on-delay", () => {
    const r = runFrames({ site: zeroLift, durationS: 3000, frame: closingOff() });
    const first = secondsOf(r.firstActivation("loops_crossed:CH-1"))!;
    expect(first).toBeGreaterThanOrEqual(crossingS + 30);
    expect(first).toBeLessThanOrEqual(crossingS + 50);
  });

  it("alarms on condenser pressure at or below evaporator pressure while running", () => {
    const r = runFrames({ site: zeroLift, durationS: 120, frame: () => ({ condKPa: 400, evapKPa: 410 }) });
    expect(r.firstActivation("loops_crossed:CH-1")).not.toBeNull();
  });
});

describe("tower fan not running when needed (rule 4)", () => {
  const rising = (tS: number) => 29.4 + (0.2 / 60) * tS;
  it("drive in off while condenser water rises above setpoint", () => {
    const r = runFrames({
      durationS: 600,
      frame: (tS) => ({ towerMode: "off", fanRunning: false, fanSpeedPct: 0, cwInC: rising(tS) }),
      keep: true,
    });
    const first = secondsOf(r.firstActivation("tower_fan_not_running:CT-1"))!;
    // Above setpoint + 0.5 K from t = 150 s, then the 60 s on-delay.
    expect(first).toBeGreaterThanOrEqual(210);
    expect(first).toBeLessThanOrEqual(230);
    const c = r.evaluations.at(-1)!.conditions.find((x) => x.ruleId === "tower_fan_not_running")!;
    expect(c.technicianMessage).toMatch(/in off/);
    // The chiller runs: find out why the drive is off, then back to auto.
    expect(c.advice[0]).toMatch(/find out why it is off/);
    expect(c.advice[1]).toMatch(/return the fan drive to auto/);
  });

  it("with the chiller it serves held off, the first advice is to leave the fan off (it would close the loops)", () => {
    const r = runFrames({
      durationS: 600,
      frame: (tS) => ({
        ...tripped,
        running: false,
        towerMode: "off",
        fanRunning: false,
        fanSpeedPct: 0,
        cwInC: rising(tS),
      }),
      keep: true,
    });
    expect(r.firstActivation("tower_fan_not_running:CT-1")).not.toBeNull();
    const c = r.evaluations.at(-1)!.conditions.find((x) => x.ruleId === "tower_fan_not_running")!;
    expect(c.advice[0]).toMatch(/leave the fan off/);
    expect(c.advice.join(" ")).not.toMatch(/return the fan drive to auto/);
  });

  it("commanded but not running, and a faulted drive", () => {
    expect(
      runFrames({
        durationS: 600,
        frame: (tS) => ({ fanSpeedPct: 80, fanRunning: false, cwInC: rising(tS) }),
      }).firstActivation("tower_fan_not_running:CT-1"),
    ).not.toBeNull();
    expect(
      runFrames({
        durationS: 600,
        frame: (tS) => ({ towerFault: true, fanRunning: false, cwInC: rising(tS) }),
      }).firstActivation("tower_fan_not_running:CT-1"),
    ).not.toBeNull();
  });

  it("quiet when the fan is off because the water is already cold enough", () => {
    const r = runFrames({ durationS: 600, frame: () => ({ fanSpeedPct: 0, fanRunning: false, cwInC: 27 }) });
    expect(r.firstActivation("tower_fan_not_running:CT-1")).toBeNull();
    const off = runFrames({ durationS: 600, frame: () => ({ towerMode: "off", fanRunning: false, cwInC: 28 }) });
    expect(off.firstActivation("tower_fan_not_running:CT-1")).toBeNull();
  });
});

describe("head pressure nearing trip (rule 5)", () => {
  it("warns on the projected time to the 1204.5 kPa cut-out: 10 min ahead at 10 kPa/min", () => {
    const r = runFrames({ durationS: 1500, frame: (tS) => ({ condKPa: 950 + (10 / 60) * tS }), keep: true });
    const first = secondsOf(r.firstActivation("head_pressure_near_trip:CH-1"))!;
    // 1104.5 kPa (10 min before the trip) reached at 927 s; 15 s on-delay.
    expect(first).toBeGreaterThanOrEqual(930);
    expect(first).toBeLessThanOrEqual(960);
    const c = r.evaluations.at(-1)!.conditions.find((x) => x.ruleId === "head_pressure_near_trip")!;
    expect(c.numbers.timeToTripS).toBeCloseTo((1204.5 - (950 + 250)) / (10 / 60), -1);
    expect(c.caution).toMatch(/reset by hand at the device/);
  });

  it("quiet when high but steady, warns when held just under the cut-out", () => {
    expect(
      runFrames({ durationS: 900, frame: () => ({ condKPa: 1100 }) }).firstActivation("head_pressure_near_trip:CH-1"),
    ).toBeNull();
    expect(
      runFrames({ durationS: 300, frame: () => ({ condKPa: 1180 }) }).firstActivation("head_pressure_near_trip:CH-1"),
    ).not.toBeNull();
  });

  it("takes the trip from the chiller's entered high-pressure cut-out", () => {
    // A cut-out entered at 1100 kPa: 10 min ahead at 10 kPa/min is 1000 kPa, reached at 300 s; the default waits until 927 s.
    const frame = (tS: number) => ({ condKPa: 950 + (10 / 60) * tS });
    const lowered = runFrames({
      durationS: 600,
      frame,
      site: withChillerLimits({ highCondPressureCutoutKPa: 1100 }),
      keep: true,
    });
    const first = secondsOf(lowered.firstActivation("head_pressure_near_trip:CH-1"))!;
    expect(first).toBeGreaterThanOrEqual(300);
    expect(first).toBeLessThanOrEqual(330);
    const c = lowered.evaluations.at(-1)!.conditions.find((x) => x.ruleId === "head_pressure_near_trip")!;
    expect(c.numbers.tripKPa).toBe(1100);
    expect(runFrames({ durationS: 600, frame }).firstActivation("head_pressure_near_trip:CH-1")).toBeNull();
  });
});

describe("drive temperature toward trip (rule 6)", () => {
  it("takes the trip from the chiller's entered drive temperature trip", () => {
    // Steady at 58 °C: 7.6 K under the default 65.6 °C trip (quiet unless rising), at an entered 57 °C trip (active).
    const frame = () => ({ driveC: 58 });
    expect(runFrames({ durationS: 300, frame }).firstActivation("drive_temp_toward_trip:CH-1")).toBeNull();
    const lowered = runFrames({ durationS: 300, frame, site: withChillerLimits({ driveTempTripC: 57 }) });
    expect(lowered.firstActivation("drive_temp_toward_trip:CH-1")).not.toBeNull();
  });

  it("warns when the projected time to the 65.6 °C trip falls under 15 min", () => {
    const r = runFrames({ durationS: 900, frame: (tS) => ({ driveC: 40 + (1 / 60) * tS }), keep: true });
    const first = secondsOf(r.firstActivation("drive_temp_toward_trip:CH-1"))!;
    // ttc ≤ 900 s once 40 + t/60 ≥ 50.6 → t ≈ 636 s; 15 s on-delay.
    expect(first).toBeGreaterThanOrEqual(640);
    expect(first).toBeLessThanOrEqual(670);
    const c = r.evaluations
      .find((e) => e.atMs === r.firstActivation("drive_temp_toward_trip:CH-1"))!
      .conditions.find((x) => x.ruleId === "drive_temp_toward_trip")!;
    expect(c.numbers.timeToTripS).toBeGreaterThan(800);
    expect(c.numbers.timeToTripS).toBeLessThan(900);
  });

  it("quiet when warm but steady", () => {
    expect(
      runFrames({ durationS: 900, frame: () => ({ driveC: 50 }) }).firstActivation("drive_temp_toward_trip:CH-1"),
    ).toBeNull();
  });
});

describe("utility power event suspected (rule 7)", () => {
  it("two drives faulting within 30 s: names both correlated faults", () => {
    const r = runFrames({
      durationS: 300,
      frame: (tS) => ({
        driveFault: tS >= 100 && tS < 200,
        faultText: tS >= 100 ? "Drive DC bus undervoltage" : "",
        towerFault: tS >= 110 && tS < 150,
      }),
      keep: true,
    });
    expect(secondsOf(r.firstActivation("power_event_suspected:site"))).toBe(110);
    const c = r.evaluations.at(-1)!.conditions.find((x) => x.ruleId === "power_event_suspected")!;
    expect(c.active).toBe(true);
    expect(c.related).toHaveLength(2);
    expect(c.related.join(" ")).toMatch(/CH-1 compressor drive fault.*DC bus undervoltage/);
    expect(c.related.join(" ")).toMatch(/CT-1 fan drive fault/);
  });

  it("writes the faults' times on the site's clock", () => {
    const frame = (tS: number) => ({ driveFault: tS >= 100 && tS < 200, towerFault: tS >= 110 && tS < 150 });
    const related = (timeZone?: string) =>
      runFrames({ durationS: 200, frame, keep: true, timeZone })
        .evaluations.at(-1)!
        .conditions.find((x) => x.ruleId === "power_event_suspected")!
        .related.join(" ");
    // T0 is 14:00:00 UTC on 1 July 2025; the first fault is at T0 + 100 s. US Central time is
    // UTC−5 in July (daylight time; IANA tz database, America/Chicago).
    expect(related("America/Chicago")).toMatch(/CH-1 compressor drive fault at 09:01:40 CDT/);
    expect(related("America/Chicago")).toMatch(/CT-1 fan drive fault at 09:01:50 CDT/);
    expect(related()).toMatch(/CH-1 compressor drive fault at 14:01:40 UTC/);
  });

  it("a fan drive that comes back in off counts as the second drive", () => {
    const r = runFrames({
      durationS: 300,
      frame: (tS) => ({ driveFault: tS >= 100 && tS < 110, towerMode: tS >= 100 ? "off" : "auto" }),
      keep: true,
    });
    expect(secondsOf(r.firstActivation("power_event_suspected:site"))).toBe(100);
    expect(
      r.evaluations
        .at(-1)!
        .conditions.find((x) => x.ruleId === "power_event_suspected")!
        .related.join(" "),
    ).toMatch(/CT-1 fan drive changed to off/);
  });

  it("one drive, or two far apart, is not a power event", () => {
    expect(
      runFrames({ durationS: 300, frame: (tS) => ({ driveFault: tS >= 100 }) }).firstActivation(
        "power_event_suspected:site",
      ),
    ).toBeNull();
    expect(
      runFrames({ durationS: 600, frame: (tS) => ({ driveFault: tS >= 100, towerFault: tS >= 400 }) }).firstActivation(
        "power_event_suspected:site",
      ),
    ).toBeNull();
  });
});

describe("chiller tripped / latched alarm (rule 8)", () => {
  it("raises from the latched alarm point with the fault text, and latches until acknowledged", () => {
    const r = runFrames({
      durationS: 300,
      frame: (tS) => ({
        chillerAlarm: tS >= 60 && tS < 120,
        running: tS < 60,
        faultText: tS >= 60 ? "High discharge pressure trip at 160.2 psig" : "",
      }),
      keep: true,
    });
    expect(secondsOf(r.firstActivation("chiller_tripped:CH-1"))).toBe(60);
    const c = r.evaluations
      .find((e) => e.atMs === r.firstActivation("chiller_tripped:CH-1"))!
      .conditions.find((x) => x.ruleId === "chiller_tripped")!;
    expect(c.technicianMessage).toMatch(/High discharge pressure trip at 160.2 psig/);
    expect(r.evaluations.at(-1)!.alarms.get("chiller_tripped:CH-1")!.state).toBe("latched");
  });
});

describe("communication lost (rule 9)", () => {
  it("gateway offline from the server's link status", () => {
    const r = runFrames({ durationS: 120, frame: () => ({}), comms: (tS) => ({ gatewayOnline: tS < 60 }) });
    expect(secondsOf(r.firstActivation("comm_lost:site"))).toBe(60);
  });

  it("equipment stale by event time after 5 min without readings", () => {
    const r = runFrames({ durationS: 900, frame: (tS) => ({ silent: tS >= 100 ? ["CT-1"] : [] }) });
    const first = secondsOf(r.firstActivation("comm_lost:CT-1"))!;
    expect(first).toBeGreaterThan(90 + 300);
    expect(first).toBeLessThanOrEqual(90 + 310);
    expect(r.firstActivation("comm_lost:CH-1")).toBeNull();
  });

  it("equipment never heard from is lost 5 min after the site's first reading, not at once (a start-up is not an outage)", () => {
    const r = runFrames({ durationS: 900, frame: () => ({ silent: ["CT-1"] }) });
    const first = secondsOf(r.firstActivation("comm_lost:CT-1"))!;
    expect(first).toBeGreaterThan(300);
    expect(first).toBeLessThanOrEqual(310);
  });
});

describe("efficiency drift (rule 10)", () => {
  // 60.6 L/s × 4.186 × 5.5 K = 1395 kW = 396.7 tons (REFERENCES.md §2 form).
  const settings = {
    efficiencyDrift: {
      baselines: { "CH-1": { kwPerTon: 0.55, condenserApproachK: 1.1 } },
      averagingWindowS: 600,
      onDelayS: 60,
      offDelayS: 60,
    },
  };
  it("maintenance priority when kW/ton runs 15 % over the equipment's own baseline", () => {
    const r = runFrames({ durationS: 900, stepS: 30, frame: () => ({ powerKw: 0.7 * 396.7 }), settings, keep: true });
    expect(r.firstActivation("efficiency_drift:CH-1")).not.toBeNull();
    const c = r.evaluations.at(-1)!.conditions.find((x) => x.ruleId === "efficiency_drift")!;
    expect(c.priority).toBe(4);
    expect(c.numbers.kwPerTon).toBeCloseTo(0.7, 2);
  });

  it("condenser approach above baseline", () => {
    const r = runFrames({
      durationS: 900,
      stepS: 30,
      frame: () => ({ powerKw: 0.55 * 396.7, condSatC: 34.6 + 3.5 }),
      settings,
    });
    expect(r.firstActivation("efficiency_drift:CH-1")).not.toBeNull();
  });

  it("quiet at baseline", () => {
    const r = runFrames({ durationS: 900, stepS: 30, frame: () => ({ powerKw: 0.56 * 396.7 }), settings });
    expect(r.firstActivation("efficiency_drift:CH-1")).toBeNull();
  });
});

describe("low evaporator pressure: suppressed by design while the chiller is off", () => {
  it("is suppressed while off and annunciates when running", () => {
    const off = runFrames({ durationS: 300, frame: () => ({ running: false, evapSatC: 0 }), keep: true });
    expect(off.firstActivation("low_evaporator_pressure:CH-1")).toBeNull();
    expect(off.evaluations.at(-1)!.alarms.get("low_evaporator_pressure:CH-1")!.state).toBe("suppressed_by_design");
    const on = runFrames({ durationS: 300, frame: () => ({ running: true, evapSatC: 0 }) });
    expect(on.firstActivation("low_evaporator_pressure:CH-1")).not.toBeNull();
  });
});

describe("a normal running plant", () => {
  it("raises nothing in two hours", () => {
    const r = runFrames({
      durationS: 7200,
      stepS: 15,
      frame: (tS) => ({ chwInC: 12.2 + 0.2 * Math.sin(tS / 300), condKPa: 900 + 10 * Math.sin(tS / 200) }),
    });
    expect(r.transitions.filter((t) => t.to === "unacknowledged")).toEqual([]);
  });
});

describe("tower fan drive out of auto while the plant runs", () => {
  it("off or hand while the chiller runs, whatever the water temperature and with or without a setpoint point", () => {
    // Condenser water well below its setpoint: the temperature rule stays quiet; the mode rule does not.
    for (const towerMode of ["off", "hand"] as const) {
      const r = runFrames({
        durationS: 600,
        frame: () => ({ towerMode, fanRunning: towerMode === "hand", cwInC: 24 }),
      });
      expect(r.firstActivation("tower_fan_not_running:CT-1"), towerMode).toBeNull();
      // 120 s on-delay: a drive switched through off on its way to auto is not an alarm.
      expect(secondsOf(r.firstActivation("tower_fan_not_in_auto:CT-1")), towerMode).toBe(120);
    }
    const noSetpoint = runFrames({
      durationS: 600,
      frame: () => ({ towerMode: "off", fanRunning: false, towerSetpointC: null }),
    });
    expect(noSetpoint.firstActivation("tower_fan_not_in_auto:CT-1")).not.toBeNull();
  });

  it("quiet in auto, and quiet with the drive off while no chiller runs (holding the condenser water up)", () => {
    expect(runFrames({ durationS: 600, frame: () => ({}) }).firstActivation("tower_fan_not_in_auto:CT-1")).toBeNull();
    const stopped = runFrames({ durationS: 600, frame: () => ({ towerMode: "off", running: false }) });
    expect(stopped.firstActivation("tower_fan_not_in_auto:CT-1")).toBeNull();
  });
});

describe("starts per hour against the chiller record's limit", () => {
  /** Runs 5 min, then stops for the rest of each period. */
  const cycling = (periodS: number) => (tS: number) => ({ running: tS % periodS < 300 });

  it("raises at the record's 4 starts an hour (common practice for large motors, recalled) and not below it", () => {
    const r = runFrames({ durationS: 3500, frame: cycling(900) });
    // Starts at 0 (running from the first reading, not an edge), 900, 1800, 2700 s: three in the hour.
    expect(r.firstActivation("starts_per_hour:CH-1")).toBeNull();
    const r2 = runFrames({ durationS: 3600, frame: cycling(700), keep: true });
    // Rises at 700, 1400, 2100, 2800 s: the fourth start raises it.
    expect(secondsOf(r2.firstActivation("starts_per_hour:CH-1"))).toBe(2800);
    const c = r2.evaluations.at(-1)!.conditions.find((x) => x.ruleId === "starts_per_hour")!;
    expect(c.numbers.maxStartsPerHour).toBe(4);
    expect(c.caution).toMatch(/do not shorten anti-recycle timers/);
  });

  it("takes the limit from the chiller's record", () => {
    const r = runFrames({ site: withChillerLimits({ maxStartsPerHour: 6 }), durationS: 3600, frame: cycling(700) });
    expect(r.firstActivation("starts_per_hour:CH-1")).toBeNull();
  });
});

describe("low evaporator: projected to the chiller record's cut-out", () => {
  // Saturated evaporating temperature falling 0.3 K/min from 5 °C toward the record's default 0.6 °C cut-out
  // (33 °F, freeze protection for water — common practice): the cut-out comes at ≈ 880 s.
  const falling = (derived: boolean) => (tS: number) => {
    const satC = 5 - (0.3 / 60) * tS;
    return { evapSatC: derived ? null : satC, evapKPa: saturationPressureKPa("R-134a", satC) };
  };

  it("warns about 10 min before the cut-out, not 2 min before it as the fixed 1.1 °C limit would", () => {
    for (const derived of [false, true]) {
      const r = runFrames({ durationS: 900, frame: falling(derived), keep: true });
      const first = secondsOf(r.firstActivation("low_evaporator_pressure:CH-1"));
      // 10 min before ≈ 280 s, plus the 15 s on-delay and the fit's first samples.
      expect(first, `derived ${derived}`).toBeGreaterThanOrEqual(270);
      expect(first!, `derived ${derived}`).toBeLessThanOrEqual(330);
      const c = r.evaluations.find((e) => e.atMs === r.firstActivation("low_evaporator_pressure:CH-1"))!;
      const cond = c.conditions.find((x) => x.ruleId === "low_evaporator_pressure")!;
      expect(cond.numbers.cutoutC).toBeCloseTo(0.6, 1);
      // Derived from pressure through the refrigerant's saturation curve: within 0.05 K of the read value.
      expect(cond.numbers.evaporatorSaturatedC).toBeCloseTo(5 - (0.3 / 60) * secondsOf(c.atMs)!, 1);
    }
  });

  it("quiet on a steady 3 °C evaporator", () => {
    const r = runFrames({
      durationS: 900,
      frame: () => ({ evapSatC: 3, evapKPa: saturationPressureKPa("R-134a", 3) }),
    });
    expect(r.firstActivation("low_evaporator_pressure:CH-1")).toBeNull();
  });
});

describe("pump commanded on but not proven (loss of flow at its source)", () => {
  it("raises after the 30 s flow-proof delay (common practice) when the run is not proven or the drive faults", () => {
    const r = runFrames({
      durationS: 300,
      frame: (tS) => ({ cwPumpCommand: true, cwPumpStatus: tS < 100, cwPumpFault: false }),
      keep: true,
    });
    expect(secondsOf(r.firstActivation("pump_not_proven:CWP-1"))).toBe(130);
    const c = r.evaluations.at(-1)!.conditions.find((x) => x.ruleId === "pump_not_proven")!;
    expect(c.technicianMessage).toMatch(/serves CH-1/);
    expect(c.caution).toMatch(/lockout\/tagout/);
    const fault = runFrames({ durationS: 120, frame: () => ({ cwPumpCommand: true, cwPumpFault: true }) });
    expect(fault.firstActivation("pump_not_proven:CWP-1")).not.toBeNull();
  });

  it("quiet when off as commanded, and when the site has no command point", () => {
    const off = runFrames({ durationS: 120, frame: () => ({ cwPumpCommand: false, cwPumpStatus: false }) });
    expect(off.firstActivation("pump_not_proven:CWP-1")).toBeNull();
    const noCommand = runFrames({ durationS: 120, frame: () => ({ cwPumpStatus: false }) });
    expect(noCommand.firstActivation("pump_not_proven:CWP-1")).toBeNull();
  });
});

describe("chilled water not being made (the customer's 'it's warm in here')", () => {
  it("raises 15 min after the leaving water stays more than 4 °F (2.2 K, common practice) above a 44 °F setpoint", () => {
    const r = runFrames({ durationS: 1800, frame: (tS) => ({ chwOutC: tS < 300 ? 6.7 : 9.5 }), keep: true });
    // 300 s above + the 15 min on-delay.
    const first = secondsOf(r.firstActivation("chilled_water_not_made:CH-1"));
    expect(first).toBeGreaterThanOrEqual(1200);
    expect(first!).toBeLessThanOrEqual(1210);
    const c = r.evaluations.at(-1)!.conditions.find((x) => x.ruleId === "chilled_water_not_made")!;
    expect(c.numbers.aboveSetpointK).toBeCloseTo(2.83, 2);
    expect(c.advice[0]).toMatch(/short of capacity/);
  });

  it("stays quiet within the margin, while a started chiller pulls the loop down, and when its trip has its own alarm", () => {
    expect(
      runFrames({ durationS: 1800, frame: () => ({ chwOutC: 8.5 }) }).firstActivation("chilled_water_not_made:CH-1"),
    ).toBeNull();
    const pullDown = runFrames({
      durationS: 1700,
      frame: (tS) => ({ running: tS >= 60, chwOutC: tS < 60 ? 14 : 14 - (tS - 60) / 300 }),
    });
    expect(pullDown.firstActivation("chilled_water_not_made:CH-1")).toBeNull();
    const tripped = runFrames({ durationS: 1800, frame: () => ({ running: false, chillerAlarm: true, chwOutC: 13 }) });
    expect(tripped.firstActivation("chilled_water_not_made:CH-1")).toBeNull();
  });
});

describe("sensor plausibility, and the rules resting on a failed sensor suppressed by design (ISA-18.2)", () => {
  // A thermistor input that fails open reads the bottom of its range (common practice): here −40 °C. The
  // site has no refrigerant pressures, so the crossover is judged on the entering water temperatures.
  const noShellPressures = {
    condKPa: null,
    evapKPa: null,
    condSatC: null,
    evapSatC: null,
  } as unknown as Partial<Frame>;
  const failedOpen = (tS: number): Partial<Frame> => ({
    ...noShellPressures,
    running: false,
    cwInC: tS < 120 ? 29.4 : -40,
    towerInC: 29.4,
    cwOutC: 29.4,
  });

  it("a condenser-water sensor failed open raises its own low alarm and never pages loops_crossed", () => {
    const r = runFrames({ durationS: 900, frame: failedOpen, keep: true });
    expect(r.firstActivation("sensor_implausible:CH-1")).not.toBeNull();
    expect(r.evaluations.at(-1)!.alarms.get("sensor_implausible:CH-1")!.priority).toBe(4);
    expect(r.firstActivation("loops_crossed:CH-1")).toBeNull();
    expect(r.evaluations.at(-1)!.alarms.get("loops_crossed:CH-1")!.state).toBe("suppressed_by_design");
    // The same reading with the check switched off pages it as critical: the suppression is what holds it.
    const bare = runFrames({ durationS: 900, frame: failedOpen, settings: { sensorPlausibility: { enabled: false } } });
    expect(bare.firstActivation("loops_crossed:CH-1")).not.toBeNull();
  });

  it("flags a saturated temperature off its pressure on the refrigerant's curve (R-134a: 250 kPa ≈ −4.3 °C, lib/REFERENCES.md)", () => {
    const r = runFrames({ durationS: 300, frame: () => ({ evapSatC: 5.9, evapKPa: 250 }), keep: true });
    const c = r.evaluations
      .at(-1)!
      .conditions.find((x) => x.ruleId === "sensor_implausible" && x.equipment === "CH-1")!;
    expect(c.active).toBe(true);
    expect(renderQuantities(c.technicianMessage, "si")).toMatch(
      /evaporator saturated temp\w* disagrees with its pressure by 1\d\.\d K/i,
    );
  });

  it("calls a reading frozen only when it stays exactly flat for an hour while its companion moves", () => {
    const frozen = runFrames({
      durationS: 2 * 3600,
      stepS: 20,
      frame: (tS) => ({ cwInC: 29.4, cwOutC: 34.6 + Math.sin(tS / 600) }),
    });
    const first = secondsOf(frozen.firstActivation("sensor_implausible:CH-1"));
    expect(first).not.toBeNull();
    // Flat over 90 % of the hour's window (the first sample need not sit on its edge).
    expect(first!).toBeGreaterThanOrEqual(0.9 * 3600);
    // A gateway reporting on change of value sends the same values for hours in a steady plant: not a fault.
    const steady = runFrames({ durationS: 2 * 3600, stepS: 20, frame: () => ({}) });
    expect(steady.firstActivation("sensor_implausible:CH-1")).toBeNull();
  });
});
