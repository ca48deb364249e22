import { describe, expect, it } from "vitest";
import { acknowledge, applyConditions, emptyAlarmBook, shelve, stepDelay, type DelayState } from "@/lib/alarms";

const T0 = Date.UTC(2025, 6, 1, 14, 0, 0);

describe("on/off delays (ISA-18.2 alarm attributes; starting values REFERENCES.md §7 [M])", () => {
  it("follows the condition only after it has held for the delay", () => {
    const d = { onDelayS: 60, offDelayS: 30 };
    let s: DelayState | undefined;
    const seen: boolean[] = [];
    for (const [t, raw] of [
      [0, true],
      [30, true],
      [59, true],
      [60, true],
      [70, false],
      [99, false],
      [100, false],
    ] as const) {
      s = stepDelay(s, raw, T0 + t * 1000, d);
      seen.push(s.active);
    }
    expect(seen).toEqual([false, false, false, true, true, true, false]);
  });

  it("a flicker shorter than the delay resets the clock", () => {
    const d = { onDelayS: 60, offDelayS: 0 };
    let s = stepDelay(undefined, true, T0, d);
    s = stepDelay(s, false, T0 + 50_000, d);
    s = stepDelay(s, true, T0 + 55_000, d);
    s = stepDelay(s, true, T0 + 110_000, d);
    expect(s.active).toBe(false);
    s = stepDelay(s, true, T0 + 115_000, d);
    expect(s.active).toBe(true);
  });
});

describe("alarm book", () => {
  const cond = (active: boolean, extra = {}) => ({
    ruleId: "low_evaporator_pressure",
    equipment: "CH-1",
    active,
    priority: 2 as const,
    ...extra,
  });

  it("creates alarms on first sight and records only changes", () => {
    let r = applyConditions(emptyAlarmBook(), [cond(false)], T0);
    expect(r.transitions).toHaveLength(0);
    r = applyConditions(r.book, [cond(true)], T0 + 1000);
    expect(r.transitions.map((t) => t.to)).toEqual(["unacknowledged"]);
    r = applyConditions(r.book, [cond(true)], T0 + 2000);
    expect(r.transitions).toHaveLength(0);
  });

  it("suppresses before the condition can annunciate", () => {
    const r = applyConditions(emptyAlarmBook(), [cond(true, { suppressedReason: "chiller off" })], T0);
    expect(r.transitions.map((t) => t.to)).toEqual(["suppressed_by_design", "suppressed_by_design"]);
    expect(r.book.get("low_evaporator_pressure:CH-1")!.state).toBe("suppressed_by_design");
  });

  it("a condition that clears as suppression lifts returns quietly to normal", () => {
    let r = applyConditions(emptyAlarmBook(), [cond(true, { suppressedReason: "chiller starting" })], T0);
    r = applyConditions(r.book, [cond(false)], T0 + 1000);
    expect(r.book.get("low_evaporator_pressure:CH-1")!.state).toBe("normal");
    expect(r.transitions.some((t) => t.to === "unacknowledged")).toBe(false);
  });

  it("acknowledges and shelves through commands, and expires shelves on later evaluations", () => {
    let r = applyConditions(emptyAlarmBook(), [cond(true)], T0);
    const a = acknowledge(r.book, "low_evaporator_pressure:CH-1", T0 + 1000, { kind: "person", id: "u1" }, "on my way");
    expect(a.alarm.state).toBe("acknowledged");
    const s = shelve(
      a.book,
      "low_evaporator_pressure:CH-1",
      T0 + 2000,
      { kind: "person", id: "u1" },
      10,
      "sensor fault",
    );
    expect(s.alarm.state).toBe("shelved");
    r = applyConditions(s.book, [], T0 + 2000 + 10 * 60_000);
    expect(r.transitions.map((t) => t.cause)).toEqual(["shelf_expired"]);
    expect(r.book.get("low_evaporator_pressure:CH-1")!.state).toBe("unacknowledged");
    expect(acknowledge(r.book, "nope", T0, { kind: "system" }).rejected).toBe("no such alarm");
  });
});
