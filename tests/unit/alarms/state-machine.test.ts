// ANSI/ISA-18.2 alarm lifecycle (REFERENCES.md §7: states [M], mirrored by OPC UA Part 9 [C]).
import { describe, expect, it } from "vitest";
import { newAlarm, stepAlarm, type Actor, type Alarm, type AlarmEvent, type TransitionRecord } from "@/lib/alarms";

const tech: Actor = { kind: "person", id: "tech-7" };
const T0 = Date.UTC(2025, 6, 1, 14, 0, 0);

/** Runs events in order; returns the final alarm and every record. */
function run(
  events: AlarmEvent[],
  start: Alarm = newAlarm({ ruleId: "crossover_risk", equipment: "CH-1", priority: 2 }),
) {
  let a = start;
  const records: TransitionRecord[] = [];
  const rejected: string[] = [];
  for (const e of events) {
    const r = stepAlarm(a, e);
    a = r.alarm;
    records.push(...r.transitions);
    if (r.rejected) rejected.push(r.rejected);
  }
  return { alarm: a, records, rejected, path: records.map((r) => `${r.from}>${r.to}`) };
}

const on = (s: number): AlarmEvent => ({ type: "condition", atMs: T0 + s * 1000, active: true });
const off = (s: number): AlarmEvent => ({ type: "condition", atMs: T0 + s * 1000, active: false });
const ack = (s: number, note?: string): AlarmEvent => ({ type: "acknowledge", atMs: T0 + s * 1000, actor: tech, note });

describe("core lifecycle", () => {
  it("normal → unacknowledged → acknowledged → normal", () => {
    const r = run([on(0), ack(10, "fan back in auto"), off(60)]);
    expect(r.path).toEqual(["normal>unacknowledged", "unacknowledged>acknowledged", "acknowledged>normal"]);
    expect(r.alarm.state).toBe("normal");
    expect(r.records[1]).toMatchObject({
      cause: "acknowledged",
      actor: tech,
      note: "fan back in auto",
      atMs: T0 + 10_000,
    });
    expect(r.records[0]).toMatchObject({ actor: { kind: "system" }, atMs: T0, conditionActive: true });
  });

  it("unacknowledged → returned to normal unacknowledged → (ack) normal", () => {
    const r = run([on(0), off(30), ack(40)]);
    expect(r.path).toEqual([
      "normal>unacknowledged",
      "unacknowledged>returned_unacknowledged",
      "returned_unacknowledged>normal",
    ]);
  });

  it("returned unacknowledged → unacknowledged when the condition comes back", () => {
    const r = run([on(0), off(30), on(40)]);
    expect(r.path.at(-1)).toBe("returned_unacknowledged>unacknowledged");
  });

  it("an acknowledged alarm stays acknowledged while the condition holds", () => {
    const r = run([on(0), ack(5), on(6)]);
    expect(r.alarm.state).toBe("acknowledged");
    expect(r.records).toHaveLength(2);
  });

  it("refuses to acknowledge an alarm in normal", () => {
    const r = run([ack(0)]);
    expect(r.rejected).toEqual(["nothing to acknowledge"]);
    expect(r.records).toHaveLength(0);
  });

  it("a latching alarm holds after the condition clears until acknowledged", () => {
    const start = newAlarm({ ruleId: "chiller_tripped", equipment: "CH-1", priority: 2, latching: true });
    const r = run([on(0), ack(5), off(30), ack(60)], start);
    expect(r.path).toEqual([
      "normal>unacknowledged",
      "unacknowledged>acknowledged",
      "acknowledged>latched",
      "latched>normal",
    ]);
    const r2 = run([on(0), off(30)], start);
    expect(r2.alarm.state).toBe("latched");
  });
});

describe("shelving", () => {
  const shelve = (s: number, minutes: number, reason = "tower fan under repair"): AlarmEvent => ({
    type: "shelve",
    atMs: T0 + s * 1000,
    actor: tech,
    untilMs: T0 + s * 1000 + minutes * 60_000,
    reason,
  });

  it("shelves with a reason and expiry, keeps tracking the condition, and re-annunciates on expiry if still active", () => {
    const r = run([on(0), shelve(10, 30), off(60), on(120), { type: "tick", atMs: T0 + 10_000 + 30 * 60_000 }]);
    expect(r.path).toEqual([
      "normal>unacknowledged",
      "unacknowledged>shelved",
      "shelved>shelved",
      "shelved>shelved",
      "shelved>unacknowledged",
    ]);
    const expiry = r.records.at(-1)!;
    expect(expiry).toMatchObject({
      cause: "shelf_expired",
      actor: { kind: "system" },
      atMs: T0 + 10_000 + 30 * 60_000,
    });
    expect(r.records[1]).toMatchObject({ cause: "shelved", note: "tower fan under repair", actor: tech });
  });

  it("returns to normal on expiry when the condition has cleared", () => {
    const r = run([on(0), shelve(10, 5), off(60), { type: "tick", atMs: T0 + 3600_000 }]);
    expect(r.alarm.state).toBe("normal");
    expect(r.alarm.shelf).toBeNull();
  });

  it("expires a shelf first on any later event, at the expiry time", () => {
    const r = run([on(0), shelve(10, 1), off(600)]);
    expect(r.records.map((x) => x.cause)).toEqual([
      "condition_active",
      "shelved",
      "shelf_expired",
      "condition_cleared",
    ]);
    expect(r.records[2].atMs).toBe(T0 + 70_000);
    expect(r.alarm.state).toBe("returned_unacknowledged");
  });

  it("does not annunciate while shelved", () => {
    const r = run([shelve(0, 30), on(10)]);
    expect(r.alarm.state).toBe("shelved");
    expect(r.alarm.conditionActive).toBe(true);
  });

  it("unshelve by a person re-evaluates from the condition", () => {
    const r = run([on(0), shelve(10, 30), { type: "unshelve", atMs: T0 + 60_000, actor: tech }]);
    expect(r.path.at(-1)).toBe("shelved>unacknowledged");
    expect(r.records.at(-1)!.cause).toBe("unshelved");
  });

  it("requires a reason and a future expiry, and refuses acknowledgement while shelved", () => {
    expect(run([on(0), shelve(10, 30, "  ")]).rejected).toEqual(["a shelving reason is required"]);
    expect(run([on(0), shelve(10, 0)]).rejected).toEqual(["shelving must end in the future"]);
    expect(run([on(0), shelve(10, 30), ack(20)]).rejected).toEqual(["cannot acknowledge while shelved"]);
    expect(run([{ type: "unshelve", atMs: T0, actor: tech }]).rejected).toEqual(["not shelved"]);
  });
});

describe("suppressed by design", () => {
  it("hides the alarm while suppressed and re-evaluates when lifted", () => {
    const start = newAlarm({ ruleId: "low_evaporator_pressure", equipment: "CH-1", priority: 2 });
    const r = run(
      [{ type: "suppress", atMs: T0, reason: "chiller off" }, on(10), { type: "unsuppress", atMs: T0 + 60_000 }],
      start,
    );
    expect(r.path).toEqual([
      "normal>suppressed_by_design",
      "suppressed_by_design>suppressed_by_design",
      "suppressed_by_design>unacknowledged",
    ]);
    expect(r.records[0]).toMatchObject({ cause: "suppressed", note: "chiller off" });
  });

  it("returns to normal on unsuppress when the condition is clear", () => {
    const r = run([
      on(0),
      { type: "suppress", atMs: T0 + 1000, reason: "chiller off" },
      off(20),
      { type: "unsuppress", atMs: T0 + 30_000 },
    ]);
    expect(r.alarm.state).toBe("normal");
  });

  it("a repeated suppress with the same reason records nothing", () => {
    const r = run([
      { type: "suppress", atMs: T0, reason: "chiller off" },
      { type: "suppress", atMs: T0 + 1, reason: "chiller off" },
    ]);
    expect(r.records).toHaveLength(1);
  });
});

describe("out of service", () => {
  it("takes precedence over everything and returns by re-evaluating", () => {
    const r = run([
      on(0),
      { type: "remove_from_service", atMs: T0 + 10_000, actor: tech, reason: "sensor replaced" },
      { type: "shelve", atMs: T0 + 20_000, actor: tech, untilMs: T0 + 999_000, reason: "x" },
      { type: "suppress", atMs: T0 + 25_000, reason: "chiller off" },
      { type: "unsuppress", atMs: T0 + 26_000 },
      off(30),
      { type: "return_to_service", atMs: T0 + 40_000, actor: tech },
    ]);
    expect(r.rejected).toEqual(["out of service"]);
    expect(r.path).toEqual([
      "normal>unacknowledged",
      "unacknowledged>out_of_service",
      "out_of_service>out_of_service",
      "out_of_service>out_of_service",
      "out_of_service>out_of_service",
      "out_of_service>normal",
    ]);
    expect(r.records[1]).toMatchObject({ cause: "removed_from_service", note: "sensor replaced", actor: tech });
  });

  it("returns to unacknowledged if the condition is active on return", () => {
    const r = run([
      { type: "remove_from_service", atMs: T0, actor: tech, reason: "calibration" },
      on(10),
      { type: "return_to_service", atMs: T0 + 20_000, actor: tech },
    ]);
    expect(r.alarm.state).toBe("unacknowledged");
  });

  it("needs a reason", () => {
    expect(run([{ type: "remove_from_service", atMs: T0, actor: tech, reason: "" }]).rejected).toEqual([
      "a reason is required",
    ]);
  });
});

describe("audit records", () => {
  it("every record carries from, to, event time, actor and note; the input alarm is never mutated", () => {
    const a = newAlarm({ ruleId: "crossover_risk", equipment: "CH-1", priority: 2 });
    const frozen = JSON.stringify(a);
    const r = stepAlarm(a, on(0));
    expect(JSON.stringify(a)).toBe(frozen);
    for (const rec of r.transitions) {
      expect(rec).toHaveProperty("from");
      expect(rec).toHaveProperty("to");
      expect(typeof rec.atMs).toBe("number");
      expect(rec.actor).toBeDefined();
      expect(rec).toHaveProperty("note");
    }
  });
});
