import { describe, expect, it } from "vitest";
import { drillActionSchema, drillCommandSchema, timerLimits } from "@/simulator";
import { record } from "./helpers";

describe("drill actions", () => {
  it("the zod schema rejects malformed commands and accepts bare or wrapped actions", () => {
    expect(drillActionSchema.safeParse({ type: "set-fan-drive-mode", equipment: "CT-1", mode: "turbo" }).success).toBe(
      false,
    );
    expect(drillActionSchema.safeParse({ type: "launch", equipment: "CH-1" }).success).toBe(false);
    expect(drillCommandSchema.safeParse({ id: "a1", action: { type: "reset-alarm", equipment: "CH-1" } }).success).toBe(
      true,
    );
    expect(drillCommandSchema.safeParse({ type: "set-air-handler", equipment: "AHU-2", run: false }).success).toBe(
      true,
    );
  });
  it("anti-recycle timers outside the controller limits are refused with the reason; inside are accepted (limits: common practice)", () => {
    expect(timerLimits["start-to-start"].min).toBe(120);
    expect(timerLimits["stop-to-start"].min).toBe(60);
    const r = record({
      scenario: "normal-day",
      seed: 1,
      durationS: 120,
      actions: [
        {
          atS: 10,
          action: { type: "set-anti-recycle-timer", equipment: "CH-1", timer: "start-to-start", seconds: 60 },
        },
        { atS: 20, action: { type: "set-anti-recycle-timer", equipment: "CH-1", timer: "stop-to-start", seconds: 30 } },
        {
          atS: 30,
          action: { type: "set-anti-recycle-timer", equipment: "CH-1", timer: "start-to-start", seconds: 120 },
        },
        { atS: 40, action: { type: "reset-alarm", equipment: "CH-1" } },
        { atS: 50, action: { type: "set-fan-drive-mode", equipment: "CH-1", mode: "hand" } },
        { atS: 60, action: { type: "set-fan-drive-mode", equipment: "CT-1", mode: "hand", handHz: 60 } },
      ],
    });
    const refused = r.events.filter((e) => e.kind === "action-refused").map((e) => e.message);
    expect(refused).toHaveLength(4);
    expect(refused[0]).toMatch(/outside the controller limits 120–3600 s/);
    expect(refused[1]).toMatch(/outside the controller limits 60–1800 s/);
    expect(refused[2]).toMatch(/no latched alarm/);
    expect(refused[3]).toMatch(/has no fan drive/);
    const sts = r.num("CH-1", "start_to_start_timer_setting");
    expect(sts.v.at(-1)).toBe(120);
    expect(r.events.filter((e) => e.kind === "action")).toHaveLength(2);
  });
  it("a fan drive set to hand at 60 Hz runs at full speed (common practice, recalled)", () => {
    const r = record({
      scenario: "slow-crossover",
      seed: 2,
      durationS: 300,
      actions: [{ atS: 10, action: { type: "set-fan-drive-mode", equipment: "CT-1", mode: "hand", handHz: 60 } }],
    });
    expect(r.num("CT-1", "fan_speed").v.at(-1)).toBeCloseTo(100, 5);
    expect(r.num("CT-1", "fan_drive_frequency").v.at(-1)).toBeCloseTo(60, 5);
    expect(r.get("CT-1", "fan_drive_mode").v.at(-1)).toBe("hand");
  });
  it("stopping air handlers sheds their load (valve closes, run status off)", () => {
    const r = record({
      scenario: "normal-day",
      seed: 1,
      durationS: 60,
      actions: [{ atS: 0, action: { type: "set-air-handler", equipment: "AHU-1", run: false } }],
    });
    expect(r.get("AHU-1", "run_status").v.at(-1)).toBe(false);
    expect(r.num("AHU-1", "chilled_water_valve_position").v.at(-1)).toBe(0);
  });
});
