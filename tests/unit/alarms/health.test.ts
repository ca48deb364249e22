// Alarm-system health after ISA-18.2 / EEMUA 191 (REFERENCES.md §7).
import { describe, expect, it } from "vitest";
import { computeAlarmHealth, findFloods, newAlarm, type Priority, type TransitionRecord } from "@/lib/alarms";

const T0 = Date.UTC(2025, 6, 1, 0, 0, 0);
const MIN = 60_000;

function activation(key: string, atMs: number, priority: Priority = 4): TransitionRecord {
  const [ruleId, equipment] = key.split(":");
  return {
    alarmKey: key,
    ruleId,
    equipment,
    priority,
    from: "normal",
    to: "unacknowledged",
    cause: "condition_active",
    atMs,
    actor: { kind: "system" },
    note: null,
    conditionActive: true,
  };
}
function cleared(key: string, atMs: number): TransitionRecord {
  return {
    ...activation(key, atMs),
    from: "unacknowledged",
    to: "returned_unacknowledged",
    cause: "condition_cleared",
    conditionActive: false,
  };
}

describe("alarm rate per on-call person", () => {
  it("< 1 per 10 min per person is acceptable, 1–2 manageable, above is overloaded (EEMUA 191 / ISA-18.2 [C])", () => {
    const hour = 3600_000;
    const five = Array.from({ length: 5 }, (_, i) => activation(`r${i}:CH-1`, T0 + i * 10 * MIN));
    expect(computeAlarmHealth({ records: five, fromMs: T0, toMs: T0 + hour, onCallPeople: 1 }).rate).toMatchObject({
      assessment: "acceptable",
    });
    const nine = Array.from({ length: 9 }, (_, i) => activation(`r${i}:CH-1`, T0 + i * 6 * MIN));
    const h = computeAlarmHealth({ records: nine, fromMs: T0, toMs: T0 + hour, onCallPeople: 1 });
    expect(h.rate.averagePer10MinPerPerson).toBeCloseTo(1.5, 10);
    expect(h.rate.assessment).toBe("manageable");
    // Two people on call share the same load.
    expect(computeAlarmHealth({ records: nine, fromMs: T0, toMs: T0 + hour, onCallPeople: 2 }).rate.assessment).toBe(
      "acceptable",
    );
  });
});

describe("floods", () => {
  it("start above 10 in 10 minutes and end below 5 per 10 minutes (REFERENCES.md §7 [C])", () => {
    // 12 alarms, one every 30 s from T0: the 11th (at 5 min) starts the flood.
    const times = Array.from({ length: 12 }, (_, i) => T0 + i * 30_000);
    const floods = findFloods(times, T0 + 3600_000);
    expect(floods).toHaveLength(1);
    expect(floods[0].startMs).toBe(T0 + 10 * 30_000);
    // The trailing count drops to 4 (< 5) once alarms 0…7 have left the window: alarm 7's time + 10 min.
    expect(floods[0].endMs).toBe(T0 + 7 * 30_000 + 10 * MIN);
    expect(floods[0].ongoing).toBe(false);
  });

  it("10 in 10 minutes is not a flood", () => {
    expect(
      findFloods(
        Array.from({ length: 10 }, (_, i) => T0 + i * 30_000),
        T0 + 3600_000,
      ),
    ).toHaveLength(0);
  });

  it("reports time in flood", () => {
    const records = Array.from({ length: 12 }, (_, i) => activation(`r${i}:CH-1`, T0 + i * 30_000));
    const h = computeAlarmHealth({ records, fromMs: T0, toMs: T0 + 100 * MIN, onCallPeople: 1 });
    // Flood from alarm 10 (300 s) to 810 s, over a 100-minute period.
    expect(h.timeInFloodFraction).toBeCloseTo((810_000 - 300_000) / (100 * MIN), 10);
  });
});

describe("most frequent, chattering, stale, priority split", () => {
  it("ranks the most frequent alarms with their share of all alarms", () => {
    const records = [
      ...Array.from({ length: 6 }, (_, i) => activation("tower_fan_not_running:CT-1", T0 + i * 20 * MIN)),
      ...Array.from({ length: 2 }, (_, i) => activation("comm_lost:CH-1", T0 + i * 30 * MIN)),
    ];
    const h = computeAlarmHealth({ records, fromMs: T0, toMs: T0 + 3 * 3600_000, onCallPeople: 1 });
    expect(h.topAlarms[0]).toMatchObject({ alarmKey: "tower_fan_not_running:CT-1", count: 6, share: 0.75 });
    expect(h.topAlarms[1].count).toBe(2);
  });

  it("chattering: ≥ 3 transitions in 60 s (common test, REFERENCES.md §7 [M])", () => {
    const k = "head_pressure_near_trip:CH-1";
    const chatter = [activation(k, T0), cleared(k, T0 + 20_000), activation(k, T0 + 40_000)];
    const spread = [activation(k, T0), cleared(k, T0 + 40_000), activation(k, T0 + 80_000)];
    expect(
      computeAlarmHealth({ records: chatter, fromMs: T0, toMs: T0 + 3600_000, onCallPeople: 1 }).chattering,
    ).toHaveLength(1);
    expect(
      computeAlarmHealth({ records: spread, fromMs: T0, toMs: T0 + 3600_000, onCallPeople: 1 }).chattering,
    ).toHaveLength(0);
  });

  it("stale: active more than 24 h (REFERENCES.md §7 [M])", () => {
    const old = {
      ...newAlarm({ ruleId: "efficiency_drift", equipment: "CH-2", priority: 4 }),
      conditionActive: true,
      conditionSinceMs: T0 - 25 * 3600_000,
    };
    const fresh = {
      ...newAlarm({ ruleId: "comm_lost", equipment: "CH-1", priority: 3 }),
      conditionActive: true,
      conditionSinceMs: T0 - 3600_000,
    };
    const h = computeAlarmHealth({
      records: [],
      alarms: [old, fresh],
      fromMs: T0 - 86400_000,
      toMs: T0,
      onCallPeople: 1,
    });
    expect(h.stale.map((s) => s.alarmKey)).toEqual(["efficiency_drift:CH-2"]);
    expect(h.stale[0].activeForS).toBe(25 * 3600);
  });

  it("priority split against ~80 / 15 / 5 % and < 1 % for the highest (ISA-18.2 [M])", () => {
    const mk = (p: Priority, n: number) =>
      Array.from({ length: n }, (_, i) => activation(`p${p}-${i}:CH-1`, T0 + i * 1000 + p * 100_000, p));
    const good = [...mk(4, 80), ...mk(3, 15), ...mk(2, 5)];
    const h = computeAlarmHealth({ records: good, fromMs: T0, toMs: T0 + 86400_000, onCallPeople: 1 });
    expect(h.priorityDistribution.every((d) => d.withinGuidance)).toBe(true);
    const bad = [...mk(1, 20), ...mk(4, 80)];
    const hb = computeAlarmHealth({ records: bad, fromMs: T0, toMs: T0 + 86400_000, onCallPeople: 1 });
    expect(hb.priorityDistribution.find((d) => d.priority === 1)).toMatchObject({ share: 0.2, withinGuidance: false });
  });
});
