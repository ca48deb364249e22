import { describe, expect, it } from "vitest";
import {
  automaticTitle,
  groupingRule,
  incidentEndMs,
  incidentFor,
  mergedSpan,
  splitMembers,
  type GroupableIncident,
  type MemberActivation,
} from "@/lib/incidents/grouping";
import { keyFigures } from "@/lib/incidents/key-figures";
import { orderTimeline, plantEvents, wallToEventTime } from "@/lib/incidents/timeline";
import { composeCustomerSummary, parseCustomerSummary } from "@/lib/incidents/customer-summary";

// Grouping rule (lib/rules/README.md, "Incidents"): the 10-minute window is ISA-18.2's alarm-flood
// measuring interval (lib/REFERENCES.md §7: a flood is more than 10 alarms in 10 minutes); the cause chain follows the
// power-blip sequence in simulator/scenarios/power-blip.ts (drive fault → fan in off → high-pressure
// trip → crossover while held off).

const MIN = 60_000;
const t0 = Date.UTC(2026, 6, 1, 15);
const member = (
  ruleId: string,
  atMin: number,
  clearedMin: number | null = null,
  equipment = "CH-1",
): MemberActivation => ({
  alarmId: `${ruleId}:${equipment}`,
  ruleId,
  equipment,
  activeSinceMs: t0 + atMin * MIN,
  clearedAtMs: clearedMin === null ? null : t0 + clearedMin * MIN,
});
const incident = (id: string, members: MemberActivation[], endedAtMs: number | null = null): GroupableIncident => ({
  id,
  startedAtMs: Math.min(...members.map((m) => m.activeSinceMs)),
  endedAtMs,
  members,
});

describe("incidentFor", () => {
  it("joins an activation that starts within the window of a member", () => {
    const inc = incident("a", [member("comm_lost", 0, null, "site")]);
    expect(incidentFor([inc], { ruleId: "efficiency_drift", activeSinceMs: t0 + 9 * MIN })).toEqual({
      incidentId: "a",
      reason: "window",
    });
    // One minute past the window, unrelated by cause: a new incident.
    expect(incidentFor([inc], { ruleId: "efficiency_drift", activeSinceMs: t0 + 11 * MIN })).toBeNull();
    expect(groupingRule.windowS).toBe(600);
  });

  it("joins a later effect of a cause already in the incident (power event → fan → trip → crossover)", () => {
    const inc = incident("blip", [
      member("power_event_suspected", 0, 30, "site"),
      member("tower_fan_not_in_auto", 2, null, "CT-1"),
    ]);
    // The crossover comes more than an hour later, long past the window: linked by the chain.
    expect(incidentFor([inc], { ruleId: "loops_crossed", activeSinceMs: t0 + 135 * MIN })).toEqual({
      incidentId: "blip",
      reason: "root_cause",
    });
    // A cause does not join its own effect's incident after the window: a power event is a new story.
    const crossingOnly = incident("x", [member("crossover_risk", 0)]);
    expect(incidentFor([crossingOnly], { ruleId: "power_event_suspected", activeSinceMs: t0 + 60 * MIN })).toBeNull();
  });

  it("never joins an ended incident, and prefers the most recent of several", () => {
    const ended = incident("old", [member("chiller_tripped", 0, 5)], t0 + 5 * MIN);
    expect(incidentFor([ended], { ruleId: "loops_crossed", activeSinceMs: t0 + 6 * MIN })).toBeNull();
    const a = incident("a", [member("comm_lost", 0, null, "site")]);
    const b = incident("b", [member("comm_lost", 5, null, "CT-1")]);
    expect(incidentFor([a, b], { ruleId: "starts_per_hour", activeSinceMs: t0 + 8 * MIN })?.incidentId).toBe("b");
  });
});

describe("incidentEndMs", () => {
  it("ends after every member returned to normal and the quiet period passed, at the last return", () => {
    const ms = [member("power_event_suspected", 0, 30, "site"), member("chiller_tripped", 20, 90)];
    expect(incidentEndMs(ms, t0 + 100 * MIN)).toBeNull(); // 10 quiet minutes only
    expect(incidentEndMs(ms, t0 + (90 + groupingRule.quietS / 60) * MIN)).toBe(t0 + 90 * MIN);
    expect(incidentEndMs([...ms, member("loops_crossed", 60)], t0 + 600 * MIN)).toBeNull(); // one still active
  });
});

describe("merge and split", () => {
  it("merge spans both and lasts while either does", () => {
    const a = incident("a", [member("comm_lost", 0, 5, "site")], t0 + 5 * MIN);
    const b = incident("b", [member("chiller_tripped", 30)]);
    expect(mergedSpan(a, b)).toEqual({ startedAtMs: t0, endedAtMs: null });
    expect(mergedSpan(a, { ...b, endedAtMs: t0 + 40 * MIN })).toEqual({ startedAtMs: t0, endedAtMs: t0 + 40 * MIN });
  });

  it("split moves the chosen activations and keeps at least one on each side", () => {
    const ms = [
      member("power_event_suspected", 0, 30, "site"),
      member("chiller_tripped", 20),
      member("loops_crossed", 130),
    ];
    const r = splitMembers(ms, [{ alarmId: "loops_crossed:CH-1", activeSinceMs: t0 + 130 * MIN }]);
    expect("error" in r).toBe(false);
    if (!("error" in r)) {
      expect(r.moved.map((m) => m.ruleId)).toEqual(["loops_crossed"]);
      expect(r.kept.map((m) => m.ruleId)).toEqual(["power_event_suspected", "chiller_tripped"]);
    }
    expect(splitMembers(ms, ms)).toEqual({ error: "At least one alarm must stay in the incident." });
    expect(splitMembers(ms, [{ alarmId: "nope", activeSinceMs: 1 }])).toHaveProperty("error");
  });

  it("names an incident by its root cause and worst outcome", () => {
    const title = automaticTitle([
      member("power_event_suspected", 0, 30, "site"),
      member("chiller_tripped", 20),
      member("loops_crossed", 130),
    ]);
    expect(title).toBe("Power event → loops crossed (CH-1)");
  });
});

describe("key figures", () => {
  it("measures the warning lead to the crossing, response times and extremes", () => {
    const members = [
      member("power_event_suspected", 0, 30, "site"),
      member("crossover_risk", 50, null),
      member("restart_race", 45, null),
      member("loops_crossed", 131, null),
    ];
    const f = keyFigures({
      members,
      acknowledgedAtMs: [t0 + 12 * MIN, t0 - MIN],
      actionAtMs: [t0 + 15 * MIN],
      marginK: { tsMs: [t0 + 40 * MIN, t0 + 100 * MIN, t0 + 130 * MIN, t0 + 140 * MIN], values: [8, 3, -0.1, -2] },
      driveTempC: { tsMs: [t0, t0 + 150 * MIN], values: [35, 52] },
    });
    // First warning: restart_race at 45 min; crossing: the first margin ≤ 0 after it, at 130 min.
    expect(f.firstWarning).toEqual({ ruleId: "restart_race", atMs: t0 + 45 * MIN });
    expect(f.leadEnd).toEqual({ kind: "crossing", atMs: t0 + 130 * MIN });
    expect(f.warningLeadS).toBe(85 * 60);
    expect(f.timeToAcknowledgeS).toBe(12 * 60); // an acknowledgement before the start does not count
    expect(f.timeToFirstActionS).toBe(15 * 60);
    expect(f.timeToRecoveryS).toBeNull();
    expect(f.lowestMargin).toEqual({ valueK: -2, atMs: t0 + 140 * MIN });
    expect(f.highestDriveTemp).toEqual({ valueC: 52, atMs: t0 + 150 * MIN });
  });

  it("ends the lead at recovery when the loops never crossed", () => {
    const f = keyFigures({
      members: [member("crossover_risk", 10, 70), member("tower_fan_not_running", 0, 60, "CT-1")],
      acknowledgedAtMs: [],
      actionAtMs: [],
      marginK: { tsMs: [t0, t0 + 60 * MIN], values: [6, 2.5] },
    });
    expect(f.leadEnd).toEqual({ kind: "recovery", atMs: t0 + 70 * MIN });
    expect(f.warningLeadS).toBe(60 * 60);
    expect(f.timeToRecoveryS).toBe(70 * 60);
  });
});

describe("timeline", () => {
  it("turns state-point changes into plant events and orders everything by event time", () => {
    const events = plantEvents(
      [
        {
          equipment: "CT-1",
          quantity: "fan_drive_mode",
          points: [
            { tsMs: t0, value: "auto" },
            { tsMs: t0 + MIN, value: "off" },
            { tsMs: t0 + 2 * MIN, value: "off" },
          ],
        },
        {
          equipment: "CH-1",
          quantity: "run_status",
          points: [
            { tsMs: t0, value: 1 },
            { tsMs: t0 + 20 * MIN, value: 0 },
          ],
        },
      ],
      t0,
      t0 + 60 * MIN,
    );
    expect(events.map((e) => e.text)).toEqual(["fan drive mode: off", "stopped"]);
    const ordered = orderTimeline([
      { atMs: t0 + 20 * MIN, kind: "acknowledgement", equipment: "CH-1", text: "ack", who: "A" },
      ...events,
    ]);
    expect(ordered.map((e) => e.atMs)).toEqual([t0 + MIN, t0 + 20 * MIN, t0 + 20 * MIN]);
    // At the same instant the plant's event comes before what a person did about it.
    expect(ordered[1].kind).toBe("plant");
  });

  it("places a person's entry by the nearest earlier transition's clock offset", () => {
    const pairs = [
      { wallMs: 1_000_000, eventMs: 5_000_000 },
      { wallMs: 2_000_000, eventMs: 9_000_000 },
    ];
    expect(wallToEventTime(pairs, 2_000_500)).toBe(9_000_500);
    expect(wallToEventTime(pairs, 1_500_000)).toBe(5_500_000);
    expect(wallToEventTime([], 42)).toBe(42);
  });

  it("keeps the customer's version's three parts through storage", () => {
    const parts = { happened: "A blip.", done: "Fan to auto.\nReset.", recommended: "Auto-restart." };
    expect(parseCustomerSummary(composeCustomerSummary(parts))).toEqual(parts);
    expect(parseCustomerSummary("Just words").happened).toBe("Just words");
  });
});
