import { describe, expect, it } from "vitest";
import { defaultLayout, powerBlipRightActions } from "@/simulator";
import { cToF, firstTime, record, window } from "./helpers";

// Check values from common practice (recalled, no published source): drive trip ~150 °F,
// normal running 100–110 °F; condenser water > 100 °F entering and leaving with the tower fan off;
// loops cross within roughly 20–40 min of the trip.
const noAction = record({ scenario: "power-blip", seed: 7, durationS: 4 * 3600, sampleEveryS: 10 });
const tripEvent = noAction.events.find(
  (e) => e.kind === "alarm" && e.equipment === "CH-1" && /High condenser pressure/.test(e.message),
);
const startMs = Date.UTC(2026, 5, 1, 0, 0, 0);
const tripS = tripEvent ? (tripEvent.tsMs - startMs) / 1000 : NaN;

/** First time after `afterS` that CH-1's condenser water entering is at or below its chilled water entering. */
function crossoverS(r: typeof noAction, afterS: number): number | undefined {
  const cw = r.num("CH-1", "condenser_water_entering_temp");
  const chw = r.num("CH-1", "chilled_water_entering_temp");
  return firstTime(cw, (v, i) => cw.t[i] > afterS && v <= chw.v[i]);
}

describe("power-blip, nobody acts", () => {
  it("the blip faults the tower fan drive, which comes back in off with its fault no longer shown", () => {
    expect(
      noAction.events.some(
        (e) => e.kind === "fault" && e.equipment === "CT-1" && /DC bus undervoltage/.test(e.message),
      ),
    ).toBe(true);
    const mode = noAction.get("CT-1", "fan_drive_mode");
    const after = mode.v.filter((_, i) => mode.t[i] > 11 * 60);
    expect(after.every((m) => m === "off")).toBe(true);
    const flt = noAction.get("CT-1", "fan_drive_fault");
    expect(flt.v.filter((_, i) => flt.t[i] > 11 * 60).every((f) => f === false)).toBe(true);
    expect(noAction.get("CT-1", "fault_text").v.at(-1)).toBe("none");
  });
  it("condenser water climbs past 100 °F entering and leaving", () => {
    expect(Math.max(...noAction.num("CH-1", "condenser_water_entering_temp").v.map(cToF))).toBeGreaterThan(100);
    expect(Math.max(...noAction.num("CH-1", "condenser_water_leaving_temp").v.map(cToF))).toBeGreaterThan(100);
  });
  it("the chiller trips on high condenser pressure and latches the alarm", () => {
    expect(tripEvent).toBeDefined();
    expect(noAction.events.some((e) => e.kind === "fault" && /High discharge pressure/.test(e.message))).toBe(true);
    const alarm = noAction.get("CH-1", "chiller_alarm");
    expect(alarm.v[alarm.t.findIndex((t) => t > tripS + 60)]).toBe(true);
  });
  it("the anti-recycle timer holds restart off right after the trip", () => {
    const left = noAction.num("CH-1", "restart_inhibit_time_left");
    const first = left.v[left.t.findIndex((t) => t > tripS)];
    expect(first).toBeGreaterThan(0);
  });
  // With a condenser loop of 7 US gal/ton (recalled: 5–10 is usual) and the tower fan off, natural draft
  // cools the condenser water slowly while the air handlers warm the chilled water: an hour or more.
  it("with no action the loops cross 60–120 min after the trip", () => {
    const x = crossoverS(noAction, tripS);
    expect(x).toBeDefined();
    const minutes = ((x as number) - tripS) / 60;
    expect(minutes).toBeGreaterThanOrEqual(60);
    expect(minutes).toBeLessThanOrEqual(120);
  });
  it("a restart into crossed loops makes no cooling: the evaporator starves, the drive warms, the low-lift safety stops it", () => {
    const x = crossoverS(noAction, tripS) as number;
    const restart = noAction.events.find(
      (e) => e.equipment === "CH-1" && e.message === "Compressor started" && (e.tsMs - startMs) / 1000 > x,
    );
    expect(restart).toBeDefined();
    const restartS = (restart!.tsMs - startMs) / 1000;
    const lowLift = noAction.events.find(
      (e) => e.kind === "fault" && /^Low lift/.test(e.message) && (e.tsMs - startMs) / 1000 > restartS,
    );
    expect(lowLift).toBeDefined();
    const during = (q: Parameters<typeof noAction.num>[1]) => {
      const s = noAction.num("CH-1", q);
      return s.v.filter((_, i) => s.t[i] >= restartS && s.t[i] <= (lowLift!.tsMs - startMs) / 1000);
    };
    const chwOut = during("chilled_water_leaving_temp").map(cToF);
    const drive = during("drive_temp").map(cToF);
    // Barely any cooling (a loaded chiller takes 8–10 °F off the water) while the drive heats.
    expect(chwOut[0] - Math.min(...chwOut)).toBeLessThan(4);
    expect(Math.max(...drive)).toBeGreaterThan(drive[0] + 5);
  });
});

describe("power-blip with the right actions before crossover", () => {
  const actions = powerBlipRightActions(defaultLayout, tripS);
  const fixed = record({ scenario: "power-blip", seed: 7, durationS: 3 * 3600, sampleEveryS: 10, actions });

  it("every drill action is accepted and logged with its reason", () => {
    const logged = fixed.events.filter((e) => e.kind === "action" && /^Operator/.test(e.message));
    expect(logged.length).toBe(actions.length);
    expect(logged.every((e) => / — /.test(e.message))).toBe(true);
  });
  it("the compressor restarts before the loops cross and there is no drive trip", () => {
    const restart = fixed.events.find(
      (e) => e.equipment === "CH-1" && e.message === "Compressor started" && (e.tsMs - startMs) / 1000 > tripS,
    );
    expect(restart).toBeDefined();
    expect(crossoverS(fixed, tripS)).toBeUndefined();
    expect(fixed.events.some((e) => /Drive over-temperature/.test(e.message))).toBe(false);
  });
  it("the plant recovers: chiller running, leaving water back near setpoint, drive settling at 100–110 °F", () => {
    const end = 3 * 3600;
    expect(fixed.get("CH-1", "run_status").v.at(-1)).toBe(true);
    for (const v of window(fixed.num("CH-1", "chilled_water_leaving_temp"), end - 1800, end).map(cToF))
      expect(Math.abs(v - 44)).toBeLessThan(1.5);
    for (const v of window(fixed.num("CH-1", "drive_temp"), end - 3600, end).map(cToF)) {
      expect(v).toBeGreaterThanOrEqual(100);
      expect(v).toBeLessThanOrEqual(110);
    }
  });
});
