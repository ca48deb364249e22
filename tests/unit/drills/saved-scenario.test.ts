import { describe, expect, it } from "vitest";
import { getLayout, runPlant } from "@/simulator";
import { savedScenarioDefinition, scenarioOfSaved } from "@/simulator/saved-scenario";

// A starting point saved from stored readings: the outdoor conditions (15.6 °C = 60 °F, NIST SP 811 B.9),
// the fan drive's mode and which chillers ran carry over into the simulator; what cannot is listed.
const layout = getLayout("default")!;
const readings = [
  { equipment: "WS-1", quantity: "outdoor_air_temp", value: 15.56 },
  { equipment: "WS-1", quantity: "outdoor_air_humidity", value: 60 },
  { equipment: "CT-1", quantity: "fan_drive_mode", value: "off" },
  { equipment: "CH-1", quantity: "run_status", value: true },
  { equipment: "CH-2", quantity: "run_status", value: false },
  { equipment: "CH-2", quantity: "run_enable_command", value: false },
  { equipment: "AHU-1", quantity: "run_status", value: true },
  { equipment: "AHU-2", quantity: "run_status", value: true },
  { equipment: "AHU-3", quantity: "run_status", value: false },
  { equipment: "AHU-4", quantity: "run_status", value: false },
];

describe("saved drill starting points", () => {
  const def = savedScenarioDefinition("power-blip", "default", layout, Date.UTC(2026, 6, 1), readings);

  it("maps the stored readings to the simulator's starting state and says what is approximated", () => {
    expect(def.conditions).toEqual({ dryBulbC: 15.56, rhPct: 60, ahusRunning: 2 });
    expect(def.initial).toEqual({ disabledChillers: ["CH-2"], fanMode: "off" });
    expect(def.approximated.join(" ")).toMatch(/Weather is held/);
  });

  it("runs in the model: weather held, fan off from the start, CH-2 out of service", () => {
    const sc = scenarioOfSaved("abc", "Night of the blip", def);
    const samples = [...runPlant({ scenario: sc, seed: 3, startMs: 0, durationS: 1800, layout })];
    const last = samples[samples.length - 1];
    const at = (eq: string, q: string) => last.readings.find((r) => r.equipment === eq && r.quantity === q)?.value;
    expect(at("WS-1", "outdoor_air_temp")).toBeCloseTo(15.56, 0);
    expect(samples[0].readings.find((r) => r.equipment === "CT-1" && r.quantity === "fan_drive_mode")?.value).toBe(
      "off",
    );
    expect(
      samples.every((s) =>
        s.readings.every((r) => !(r.equipment === "CH-2" && r.quantity === "run_status" && r.value === true)),
      ),
    ).toBe(true);
  });
});
