import { describe, expect, it } from "vitest";
import { DrillTracker } from "@/lib/drills/tracker";
import { scoreDrill, type DrillStepFact } from "@/lib/drills/score";
import { drillTimerLimits } from "@/lib/schemas/drills";
import { chillerLimitDefaults } from "@/lib/plant/equipment-limits";
import { runPlant, siteLayouts, powerBlipRightActions, timerLimits, type DrillAction } from "@/simulator";

// The power-blip drill worked by a scripted trainee against the same drill left alone, scored from the
// plant's own points. Checks outside the code under test: the 150 °F (65.6 °C) drive trip (common
// practice, recalled; lib/plant/equipment-limits.ts), the anti-recycle defaults 15 min / 3 min (common
// practice, recalled) that the simulator and the drill schema must agree on, and the simulator's own
// event log (what the model says happened) against what the tracker read from the points.

const layout = siteLayouts["medical-office"];
const startMs = Date.UTC(2026, 5, 1, 14);
const tripAtS = 27 * 60 + 20; // the high-condenser-pressure trip of this layout (simulator/README.md, bench sim-crossing)
const driveTripC = chillerLimitDefaults("R-134a", "centrifugal_vsd_oil_free").driveTempTripC.value;
const timerDefaults = { "start-to-start": 900, "stop-to-start": 180 };

function run(actions: Array<{ atS: number; action: DrillAction }>) {
  const tracker = new DrillTracker(startMs);
  const endsAtMs = startMs + 4 * 3600_000;
  const events: string[] = [];
  let reason: ReturnType<DrillTracker["endReason"]> = null;
  for (const s of runPlant({ scenario: "power-blip", seed: 7, startMs, durationS: 4 * 3600, layout, actions })) {
    tracker.sample(s.tsMs, s.readings);
    for (const e of s.events) events.push(`${e.kind} ${e.equipment}: ${e.message}`);
    const tS = (s.tsMs - startMs) / 1000;
    const shed = actions.filter((a) => a.atS <= tS && a.action.type === "set-air-handler");
    const lastRun = new Map(shed.map((a) => [a.action.equipment, a.action.type === "set-air-handler" && a.action.run]));
    const outstanding = [...lastRun.values()].some((run) => !run) || tracker.timersShortened().length > 0;
    reason = tracker.endReason(endsAtMs, outstanding);
    if (reason) break;
  }
  const endReason = reason ?? "time";
  const steps: DrillStepFact[] = actions.map((a) => ({
    atMs: startMs + a.atS * 1000,
    kind: "command",
    action: a.action,
  }));
  const trip = tracker.facts.chillers.find((c) => c.tag === "CH-1")?.trippedAtMs ?? null;
  return {
    tracker,
    endReason,
    events,
    score: scoreDrill({ facts: tracker.facts, endReason, firstWarningMs: trip, steps, driveTripC, timerDefaults }),
  };
}

describe("drill score", () => {
  it("the drill schema's timer limits are the simulator's (one set of controller limits)", () => {
    expect(drillTimerLimits).toEqual(timerLimits);
    expect(driveTripC).toBeCloseTo(((150 - 32) * 5) / 9, 0);
  });

  it("a trainee who acts in time and puts things back: crossover avoided, ends on recovery, full marks", () => {
    const putBack: Array<{ atS: number; action: DrillAction }> = [
      {
        atS: tripAtS + 420,
        action: { type: "set-anti-recycle-timer", equipment: "CH-1", timer: "start-to-start", seconds: 900 },
      },
      {
        atS: tripAtS + 420,
        action: { type: "set-anti-recycle-timer", equipment: "CH-1", timer: "stop-to-start", seconds: 180 },
      },
      { atS: tripAtS + 480, action: { type: "set-air-handler", equipment: "AHU-2", run: true } },
      { atS: tripAtS + 480, action: { type: "set-air-handler", equipment: "AHU-3", run: true } },
    ];
    const r = run([...powerBlipRightActions(layout, tripAtS), ...putBack]);
    expect(r.endReason).toBe("recovery");
    expect(r.score.outcome).toBe("avoided");
    expect(r.tracker.facts.crossedAtMs).toBeNull();
    // The model's own log agrees: the compressor started again after the operator's reset.
    expect(r.events.some((e) => /reset latched alarm/.test(e))).toBe(true);
    expect(r.score.firstActionAfterS).toBeCloseTo(60, -1);
    expect(r.score.pct).toBe(100);
  });

  it("timers left short lose the put-back part", () => {
    const r = run(powerBlipRightActions(layout, tripAtS));
    expect(r.score.outcome).toBe("avoided");
    const part = r.score.parts.find((p) => p.key === "changes_put_back")!;
    expect(part.points).toBe(0);
    expect(part.detail).toMatch(/CH-1 start-to-start timer 120 s/);
  });

  it("no action: the loops cross and the late restart fails (the model stops it on its low-lift safety)", () => {
    const r = run([]);
    expect(r.score.outcome).toBe("crossed");
    expect(r.endReason).toBe("failed_restart");
    expect(r.tracker.facts.failedRestart?.stopReason).toBe("safety");
    // The model's log says the same: inverted pressures, then the low-lift stop after the late reset.
    expect(r.events.some((e) => /Refrigerant pressures inverted/.test(e))).toBe(true);
    expect(r.events.some((e) => /low-lift safety/.test(e))).toBe(true);
    expect(r.score.parts.find((p) => p.key === "crossover_avoided")!.points).toBe(0);
    expect(r.score.parts.find((p) => p.key === "first_action")!.points).toBe(0);
    expect(r.score.pct).toBeLessThan(50);
  });
});
