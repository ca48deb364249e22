// Rules on the simulator's scenarios, run faster than real time on event time: readings are
// fed in sample order and rules evaluated at each sample's timestamp, never the wall clock.
import { beforeAll, describe, expect, it } from "vitest";
import { defaultLayout, equipmentOf, runScenario } from "@/simulator";
import type { Site } from "@/lib/plant";
import { createSiteMonitor, defaultRuleSettings } from "@/lib/rules";
import type { TransitionRecord } from "@/lib/alarms";

const START_MS = Date.UTC(2025, 6, 1, 14, 0, 0);
const site: Site = equipmentOf(defaultLayout).map((e) => ({
  tag: e.tag,
  kind: e.kind,
  capacityTons: defaultLayout.chillers.find((c) => c.tag === e.tag)?.capacityTons,
}));

interface Replay {
  transitions: TransitionRecord[];
  /** First event time CH-1's condenser water entering was at or below its chilled water entering. */
  crossedAtMs: number | null;
  /** CH-1's reported anti-recycle countdown at each sample. */
  inhibitLeftAt: Map<number, number>;
  /** CH-1's reported stop reason at each sample. */
  stopReasonAt: Map<number, string>;
  wallMs: number;
}

function replay(scenario: string, durationS: number, seed = 1): Replay {
  const wall0 = performance.now();
  const monitor = createSiteMonitor({ site, settings: defaultRuleSettings });
  const transitions: TransitionRecord[] = [];
  const inhibitLeftAt = new Map<number, number>();
  const stopReasonAt = new Map<number, string>();
  let crossedAtMs: number | null = null;
  let cw: number | null = null;
  let chw: number | null = null;
  for (const sample of runScenario({ scenario, seed, startMs: START_MS, durationS, sampleEveryS: 10 })) {
    for (const r of sample.readings) {
      if (r.equipment !== "CH-1") continue;
      if (r.quantity === "condenser_water_entering_temp") cw = r.value as number;
      if (r.quantity === "chilled_water_entering_temp") chw = r.value as number;
      if (r.quantity === "restart_inhibit_time_left") inhibitLeftAt.set(sample.tsMs, r.value as number);
      if (r.quantity === "chiller_stop_reason") stopReasonAt.set(sample.tsMs, r.value as string);
    }
    if (crossedAtMs === null && cw !== null && chw !== null && cw - chw <= 0) crossedAtMs = sample.tsMs;
    monitor.ingest(sample.readings);
    transitions.push(...monitor.evaluate(sample.tsMs).transitions);
  }
  return { transitions, crossedAtMs, inhibitLeftAt, stopReasonAt, wallMs: performance.now() - wall0 };
}

const activations = (r: Replay, key: string) =>
  r.transitions.filter((t) => t.alarmKey === key && t.cause === "condition_active" && t.to === "unacknowledged");

describe("power-blip, no action", () => {
  const durationS = 165 * 60; // the scenario's late reset comes at 170 min
  let r: Replay;
  beforeAll(() => {
    r = replay("power-blip", durationS);
  });

  it("the loops do cross in this run (otherwise the checks below prove nothing)", () => {
    expect(r.crossedAtMs).not.toBeNull();
  });

  it("crossover risk fires at least 10 simulated minutes before the loops cross", () => {
    const before = activations(r, "crossover_risk:CH-1").filter((t) => t.atMs < r.crossedAtMs!);
    expect(before.length).toBeGreaterThan(0);
    expect((r.crossedAtMs! - before[0].atMs) / 60_000).toBeGreaterThanOrEqual(10);
    // The warning is also still up, or raised again, within the 10 minutes before crossing.
    const last = before.at(-1)!;
    expect((r.crossedAtMs! - last.atMs) / 60_000).toBeGreaterThanOrEqual(10);
  });

  it("restart race fires before the crossing, once the latched high-pressure trip holds the chiller — not in the stop-to-start after the blip", () => {
    const race = activations(r, "restart_race:CH-1");
    expect(race.length).toBeGreaterThan(0);
    expect(race[0].atMs).toBeLessThan(r.crossedAtMs!);
    // The blip's drive fault is an auto-reset safety: the chiller restarts on its own timers (3 min here).
    const blipMs = activations(r, "power_event_suspected:site")[0].atMs;
    expect((race[0].atMs - blipMs) / 60_000).toBeGreaterThan(10);
    expect(r.stopReasonAt.get(race[0].atMs)).toBe("trip");
  });

  it("names the root cause and the equipment problems on the way", () => {
    expect(activations(r, "power_event_suspected:site").length).toBe(1);
    expect(activations(r, "tower_fan_not_running:CT-1").length).toBe(1);
    expect(activations(r, "head_pressure_near_trip:CH-1").length).toBe(1);
    expect(activations(r, "loops_crossed:CH-1").length).toBe(1);
  });

  it("runs far faster than real time", () => {
    expect(r.wallMs).toBeLessThan((durationS * 1000) / 60);
  });
});

describe("slow-crossover", () => {
  let r: Replay;
  beforeAll(() => {
    r = replay("slow-crossover", 9 * 3600);
  });
  it("crossover risk fires at least 10 simulated minutes before the loops cross", () => {
    expect(r.crossedAtMs).not.toBeNull();
    const first = activations(r, "crossover_risk:CH-1")[0];
    expect(first).toBeDefined();
    expect((r.crossedAtMs! - first.atMs) / 60_000).toBeGreaterThanOrEqual(10);
  });
});

describe("normal-day, 24 h", () => {
  const durationS = 24 * 3600;
  let r: Replay;
  beforeAll(() => {
    r = replay("normal-day", durationS);
  });
  it("raises zero crossover, fan or head-pressure warnings", () => {
    const watched = [
      "crossover_risk",
      "restart_race",
      "loops_crossed",
      "tower_fan_not_running",
      "head_pressure_near_trip",
    ];
    const raised = r.transitions.filter((t) => watched.includes(t.ruleId) && t.to === "unacknowledged");
    expect(raised).toEqual([]);
  });
  it("runs far faster than real time", () => {
    expect(r.wallMs).toBeLessThan((durationS * 1000) / 60);
  });
});
