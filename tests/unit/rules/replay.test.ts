import { describe, expect, it } from "vitest";
import { standingAlarms, nextTransitionAfter } from "@/lib/alarms/standing";
import { diffTransitions } from "@/lib/rules/replay";

// The comparison a determinism check reports with, and the alarm list a replay shows. States are
// ANSI/ISA-18.2's (lib/alarms/states.ts, REFERENCES.md §7): an alarm stands until it returns to normal.

const t = (atMs: number, alarmKey: string, from: string, to: string, cause = "condition_active") => ({
  alarmKey,
  ruleId: alarmKey.split(":")[0],
  equipment: alarmKey.split(":")[1],
  priority: 2,
  from,
  to,
  cause,
  atMs,
});

describe("diffTransitions", () => {
  it("names a transition recorded at another event time, and ignores a person's acknowledgement", () => {
    const recorded = [
      t(10_000, "chiller_tripped:CH-1", "normal", "unacknowledged"),
      t(20_000, "chiller_tripped:CH-1", "unacknowledged", "acknowledged", "acknowledged"),
    ];
    const replayed = [t(15_000, "chiller_tripped:CH-1", "normal", "unacknowledged")];
    expect(diffTransitions(recorded, replayed)).toEqual([
      "recorded only: 10000 chiller_tripped:CH-1 normal→unacknowledged (condition_active)",
      "replayed only: 15000 chiller_tripped:CH-1 normal→unacknowledged (condition_active)",
    ]);
    expect(diffTransitions(recorded.slice(0, 1), recorded)).toEqual([]);
  });
});

describe("standingAlarms", () => {
  it("lists what was out of normal at a moment, most urgent first", () => {
    const atStart = [{ ...t(0, "comm_lost:CT-1", "normal", "unacknowledged"), priority: 3 }];
    const window = [
      t(10_000, "chiller_tripped:CH-1", "normal", "unacknowledged"),
      t(20_000, "chiller_tripped:CH-1", "unacknowledged", "latched", "condition_cleared"),
      t(30_000, "chiller_tripped:CH-1", "latched", "normal", "acknowledged"),
    ];
    expect(standingAlarms(atStart, window, 5_000).map((a) => a.alarmKey)).toEqual(["comm_lost:CT-1"]);
    expect(standingAlarms(atStart, window, 20_000).map((a) => [a.alarmKey, a.state])).toEqual([
      ["chiller_tripped:CH-1", "latched"],
      ["comm_lost:CT-1", "unacknowledged"],
    ]);
    expect(standingAlarms(atStart, window, 30_000).map((a) => a.alarmKey)).toEqual(["comm_lost:CT-1"]);
    expect(nextTransitionAfter(window, 10_000)).toBe(20_000);
    expect(nextTransitionAfter(window, 30_000)).toBeNull();
  });
});
