// Too little water through a chiller's barrel behind a proven pump (rule 17), on synthetic streams and
// on the simulator's strainer-clogging scenario. The square law (ΔP ∝ flow²: Darcy–Weisbach with a
// constant friction factor, recalled) makes a quarter of the design drop half the design flow.
import { beforeAll, describe, expect, it } from "vitest";
import { strainerSteps } from "@/simulator/scenarios/strainer-clogging";
import { renderQuantities } from "@/lib/quantity-text";
import { raised, replay, REPLAY_START_MS, type Replay } from "../../helpers/rule-replay";
import { runFrames, secondsOf, site } from "./synthetic";

// CH-1 of the synthetic plant: 50 kPa across the condenser and 60 kPa across the evaporator at design flow.
const condDesignKPa = 50;
const evapDesignKPa = 60;
const condenserAt = (share: number) => ({ condDpKPa: condDesignKPa * share ** 2, evapDpKPa: evapDesignKPa });

describe("barrel flow lost: ΔP against the drop at design flow", () => {
  it("raises 30 s (the flow-proof delay, common practice) after the condenser ΔP falls under a quarter of design", () => {
    // 0.45 of design flow → 0.2025 of the design ΔP: under the 0.5 share.
    const r = runFrames({ durationS: 300, frame: (tS) => condenserAt(tS < 100 ? 1 : 0.45), keep: true });
    expect(secondsOf(r.firstActivation("barrel_flow_lost:CH-1"))).toBe(130);
    const c = r.evaluations.at(-1)!.conditions.find((x) => x.ruleId === "barrel_flow_lost")!;
    expect(c.numbers.condenserFlowShare).toBeCloseTo(0.45, 3);
    expect(c.numbers.evaporatorFlowShare).toBeCloseTo(1, 3);
    const words = renderQuantities(c.technicianMessage, "ip");
    expect(words).toMatch(/condenser flow about 45 % of design/);
    expect(words).not.toMatch(/evaporator flow/);
    expect(c.caution).toMatch(/locked out/);
  });

  it("quiet at 60 % of design flow (a plant varying its flow), and on a chiller without design drops in its record", () => {
    const varied = runFrames({ durationS: 300, frame: () => condenserAt(0.6) });
    expect(varied.firstActivation("barrel_flow_lost:CH-1")).toBeNull();
    const noRecord = site.map((e) => (e.kind === "chiller" ? { ...e, condDesignDpKPa: undefined } : e));
    const r = runFrames({ site: noRecord, durationS: 300, frame: () => condenserAt(0.2) });
    expect(r.firstActivation("barrel_flow_lost:CH-1")).toBeNull();
  });

  it("reads a flow meter against design flow first, when the site has one", () => {
    // Metered 30 L/s of the 60.6 L/s design (49.5 %) while the ΔP still reads design: the meter wins.
    const r = runFrames({ durationS: 200, frame: () => ({ chwFlowLps: 30, evapDpKPa: evapDesignKPa }), keep: true });
    expect(r.firstActivation("barrel_flow_lost:CH-1")).not.toBeNull();
    const c = r.evaluations.at(-1)!.conditions.find((x) => x.ruleId === "barrel_flow_lost")!;
    expect(c.numbers.evaporatorFlowShare).toBeCloseTo(30 / 60.6, 3);
  });

  it("no flow due — compressor off, no pump commanded on — is no alarm", () => {
    const r = runFrames({ durationS: 300, frame: () => ({ ...condenserAt(0), running: false, enabled: false }) });
    expect(r.firstActivation("barrel_flow_lost:CH-1")).toBeNull();
  });

  it("a stopped chiller whose condenser pump is commanded on still needs the flow", () => {
    const r = runFrames({
      durationS: 300,
      frame: () => ({ ...condenserAt(0.3), running: false, cwPumpCommand: true, cwPumpStatus: true }),
    });
    expect(r.firstActivation("barrel_flow_lost:CH-1")).not.toBeNull();
  });

  it("leaves a pump that is commanded on and not proven to its own alarm (one alarm for one cause)", () => {
    const r = runFrames({
      durationS: 300,
      frame: () => ({ ...condenserAt(0), cwPumpCommand: true, cwPumpStatus: false }),
    });
    expect(r.firstActivation("pump_not_proven:CWP-1")).not.toBeNull();
    expect(r.firstActivation("barrel_flow_lost:CH-1")).toBeNull();
  });
});

describe("strainer-clogging scenario: a proven pump, a starving condenser", () => {
  let r: Replay;
  beforeAll(() => {
    r = replay("strainer-clogging", { durationS: 2 * 3600 });
  });
  const minute = (ms: number) => (ms - REPLAY_START_MS) / 60_000;

  it("raises when the flow falls under half of design (the 40 % step at 40 min), not at 80 % or 60 %", () => {
    const first = raised(r, "barrel_flow_lost:CH-1");
    expect(first.length).toBe(1);
    const under = strainerSteps.find((s) => s.share < 0.5)!.atMin;
    expect(minute(first[0].atMs)).toBeGreaterThanOrEqual(under);
    // The step's sample, the 30 s on-delay and a 10 s sample interval.
    expect(minute(first[0].atMs)).toBeLessThanOrEqual(under + 1.5);
    expect(first[0].priority).toBe(2);
  });

  it("the pump's own alarm stays quiet (it runs proven), so only the barrel reading tells", () => {
    expect(raised(r, "pump_not_proven:CWP-1")).toEqual([]);
  });

  it("clears after the strainer is cleaned", () => {
    const cleanedMin = strainerSteps.at(-1)!.atMin;
    const cleared = r.transitions.filter(
      (t) => t.alarmKey === "barrel_flow_lost:CH-1" && t.cause === "condition_cleared",
    );
    expect(cleared.length).toBe(1);
    expect(minute(cleared[0].atMs)).toBeGreaterThanOrEqual(cleanedMin);
    expect(minute(cleared[0].atMs)).toBeLessThanOrEqual(cleanedMin + 2.5);
  });
});
