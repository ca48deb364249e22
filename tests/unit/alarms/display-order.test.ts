// The site page's alarm order. ISA-18.2 / IEC 62682 (REFERENCES.md §7) names the states and asks the
// display to set active unacknowledged alarms apart first and to mark returned-to-normal unacknowledged
// ones as such; within a state, the higher priority (1) comes first, then the newest change (common practice).
import { describe, expect, it } from "vitest";
import { isQuiet, orderForDisplay, worstActive, type OrderableAlarm } from "@/lib/alarms/display-order";

const a = (id: string, state: OrderableAlarm["state"], priority: number, lastTransitionMs: number) => ({
  id,
  state,
  priority,
  lastTransitionMs,
});

describe("alarm display order", () => {
  const list = [
    a("rtn-p1", "returned_unacknowledged", 1, 500),
    a("ack-p2", "acknowledged", 2, 400),
    a("unack-p3", "unacknowledged", 3, 300),
    a("unack-p1-old", "unacknowledged", 1, 100),
    a("unack-p1-new", "unacknowledged", 1, 200),
    a("normal", "normal", 1, 900),
    a("suppressed", "suppressed_by_design", 1, 900),
    a("shelved", "shelved", 1, 900),
    a("latched", "latched", 3, 50),
  ];

  it("puts active unacknowledged first, then active acknowledged and latched, then returned-to-normal, then shelved", () => {
    expect(orderForDisplay(list).map((x) => x.id)).toEqual([
      "unack-p1-new",
      "unack-p1-old",
      "unack-p3",
      "ack-p2",
      "latched",
      "rtn-p1",
      "shelved",
    ]);
  });

  it("a cleared priority-1 alarm never outranks an active priority-3 one (the first card of the old page)", () => {
    const order = orderForDisplay([a("rtn", "returned_unacknowledged", 1, 9), a("act", "unacknowledged", 3, 1)]);
    expect(order[0].id).toBe("act");
  });

  it("draws returned-to-normal and shelved quieter, active ones not", () => {
    expect(isQuiet("returned_unacknowledged")).toBe(true);
    expect(isQuiet("shelved")).toBe(true);
    expect(isQuiet("unacknowledged")).toBe(false);
    expect(isQuiet("acknowledged")).toBe(false);
  });

  it("the worst active alarm skips cleared ones; none when only cleared ones are left", () => {
    expect(worstActive(list)?.id).toBe("unack-p1-new");
    expect(worstActive([a("rtn", "returned_unacknowledged", 1, 1)])).toBeNull();
  });
});
