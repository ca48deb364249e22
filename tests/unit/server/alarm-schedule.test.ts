import { afterEach, beforeEach, describe, expect, it } from "vitest";
import { migrateDb, openDb, type Db } from "@/db/client";
import { siteEquipment, siteTimeZone } from "@/db/queries/sites";
import { seedDemo } from "@/db/seed/demo";
import type { TransitionRecord } from "@/lib/alarms";
import type { Reading } from "@/lib/plant/site";
import { diffTransitions, replayRules } from "@/lib/rules/replay";
import { evaluationTimes, isEvaluationDue } from "@/lib/rules/schedule";
import { createAlarmService, loadRuleSettings, SETTLE_MS, type AlarmService } from "@/lib/server/alarms/service";
import { getLayout, runScenario } from "@/simulator";

// Replay determinism on the live path: the alarm service must give the same transitions however
// the same readings were cut into batches and however late its deferred evaluations ran, and a
// replay of the readings (lib/rules/replay.ts) must give them too. The reference is the
// simulator's power-blip run (a blip drops the tower fan drive into OFF, the chiller trips on
// high condenser pressure and the loops cross: simulator/scenarios/power-blip.ts).

const SITE = "millbrook-high";
const START_MS = Date.UTC(2026, 5, 1, 14, 0, 0);
let db: Db;
const dbs: Db[] = [];
let wallMs = START_MS;

/** The scenario's first 3 h, as samples of readings every 10 s (the simulated gateway's rate). */
function samples(): Reading[][] {
  const out: Reading[][] = [];
  for (const s of runScenario({
    scenario: "power-blip",
    seed: 7,
    startMs: START_MS,
    durationS: 3 * 3600,
    sampleEveryS: 10,
    layout: getLayout("school")!,
  }))
    out.push(s.readings.map((r) => ({ ...r })));
  return out;
}

/** A service on a database of its own, as a freshly started server has (no alarm rows yet). */
function service(into: TransitionRecord[]): AlarmService {
  db = openDb(":memory:");
  migrateDb(db);
  seedDemo(db, "unit-test-password");
  dbs.push(db);
  return createAlarmService({
    db,
    clock: () => wallMs,
    onAlarmsChanged: (_site, transitions) => into.push(...transitions),
    log: () => {},
  });
}

/** A small deterministic generator (mulberry32), so a failing cut can be run again. */
function random(seed: number) {
  let a = seed;
  return () => {
    a = (a + 0x6d2b79f5) | 0;
    let t = Math.imul(a ^ (a >>> 15), 1 | a);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

beforeEach(() => {
  wallMs = START_MS;
});
afterEach(() => {
  for (const d of dbs.splice(0)) d.$client.close();
});

describe("evaluation schedule", () => {
  it("depends on reading times only: the first reading of each 5 s step of event time", () => {
    expect(evaluationTimes(-Infinity, [0, 1000, 4999, 5000, 7000, 10_001, 30_000])).toEqual([0, 5000, 10_001, 30_000]);
    // Cut anywhere, the same times come out.
    const ts = [0, 1000, 4999, 5000, 7000, 10_001, 30_000];
    const first = evaluationTimes(-Infinity, ts.slice(0, 3));
    expect([...first, ...evaluationTimes(first[first.length - 1], ts.slice(3))]).toEqual([0, 5000, 10_001, 30_000]);
    // A late reading (before the last evaluation) calls for none: the live server cannot go back.
    expect(isEvaluationDue(10_001, 9_000)).toBe(false);
  });
});

describe("alarm service on event time", () => {
  it("gives the same transitions for one batch per sample, random cuts with deferred evaluations, and a replay", () => {
    const all = samples();
    const flat = all.flat();

    // One gateway message per sample, evaluated as it commits.
    const perSample: TransitionRecord[] = [];
    const a = service(perSample);
    for (const s of all) if (a.record(SITE, s)) a.evaluateDue(SITE);
    wallMs += SETTLE_MS;
    a.settle();

    // The same readings cut at random (samples split across batches, batches spanning samples),
    // with the deferred evaluation (lib/server/alarms/feed.ts) often running only after later batches.
    const cut: TransitionRecord[] = [];
    const b = service(cut);
    const rnd = random(23);
    let due = false;
    for (let i = 0; i < flat.length;) {
      const n = 1 + Math.floor(rnd() * 400);
      due = b.record(SITE, flat.slice(i, i + n)) || due;
      i += n;
      if (due && rnd() < 0.3) due = b.evaluateDue(SITE);
    }
    while (b.evaluateDue(SITE));
    wallMs += SETTLE_MS;
    b.settle();

    const replayed = replayRules({
      site: siteEquipment(db, SITE),
      settings: loadRuleSettings(db, SITE),
      timeZone: siteTimeZone(db, SITE),
      readings: flat,
      fromMs: START_MS,
      toMs: START_MS + 3 * 3600_000,
    }).transitions;

    // The scenario's incident is there to compare at all: the tower fan, the trip, the crossover.
    const raised = perSample.filter((t) => t.cause === "condition_active").map((t) => t.ruleId);
    expect(raised).toEqual(expect.arrayContaining(["power_event_suspected", "chiller_tripped", "loops_crossed"]));
    expect(diffTransitions(perSample, cut), "one batch per sample vs random cuts").toEqual([]);
    expect(diffTransitions(perSample, replayed), "live vs replay").toEqual([]);
    expect(cut.length).toBe(perSample.length);
    // Three monitors over 3 h of a plant: ~15 s alone, much more on a busy machine.
  }, 240_000);
});
