import { describe, expect, it } from "vitest";
import { equipmentSchema } from "@/lib/schemas/equipment";
import {
  emptyEquipmentForm,
  equipmentFields,
  equipmentKinds,
  formToBody,
  recordToForm,
} from "@/lib/plant/equipment-form";
import { recordFromDisplay, recordToDisplay } from "@/lib/plant/record-units";

// The equipment form's unit handling: what a technician types in IP or SI reaches the API in
// canonical SI. Factors from NIST Special Publication 811 (2008), Appendix B.8 and B.9.
const close = (actual: number, expected: number, rel = 1e-5) =>
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(Math.abs(expected) * rel + 1e-9);

describe("record units (NIST SP 811)", () => {
  it("foot of water (39.2 °F) = 2.98898 kPa (B.8)", () => {
    close(recordFromDisplay(80, "headKPa", "ip"), 80 * 2.98898);
  });

  it("cubic foot per minute = 4.719474 E-04 m³/s (B.8)", () => {
    close(recordFromDisplay(10_000, "airflowLps", "ip"), 4719.474);
  });

  it("gallon (U.S.) per minute = 6.309020 E-05 m³/s (B.8)", () => {
    close(recordFromDisplay(1200, "flowLps", "ip"), 1200 * 0.0630902);
  });

  it("°F → °C by (t − 32)/1.8 (B.9): 44 °F design leaving chilled water is 6.667 °C", () => {
    close(recordFromDisplay(44, "tempC", "ip"), 6.66667);
    expect(recordToDisplay(recordFromDisplay(44, "tempC", "ip"), "tempC", "ip")).toBe(44);
  });

  it("refrigerant pressure typed as gauge psig is stored absolute: 0 psig = 101.325 kPa (B.8, standard atmosphere)", () => {
    close(recordFromDisplay(0, "pressureKPaAbs", "ip"), 101.325);
    close(recordFromDisplay(160, "pressureKPaAbs", "ip"), 160 * 6.894757 + 101.325);
  });

  it("a ton of refrigeration is 3.516853 kW (REFERENCES.md §2): an SI tower capacity in kW is stored in tons", () => {
    close(recordFromDisplay(3516.853, "capacityTons", "si"), 1000);
    expect(recordToDisplay(1000, "capacityTons", "si")).toBe(3517);
  });
});

describe("equipment form to API body", () => {
  it("an IP chiller typed in gpm and °F passes the shared schema in canonical units", () => {
    const body = formToBody(
      "chiller",
      {
        tag: "CH-1",
        name: "Chiller 1",
        capacityTons: "500",
        refrigerant: "R-134a",
        compressorType: "centrifugal_vsd",
        chwDesignFlowLps: "1200",
        chwEnteringDesignC: "54",
        chwLeavingDesignC: "44",
        cwDesignFlowLps: "",
        model: "",
      },
      "ip",
    );
    const parsed = equipmentSchema.parse(body);
    expect(parsed.kind).toBe("chiller");
    if (parsed.kind !== "chiller") return;
    expect(parsed.capacityTons).toBe(500);
    close(parsed.chwDesignFlowLps!, 1200 * 0.0630902);
    close(parsed.chwLeavingDesignC!, 6.66667);
    expect(parsed.cwDesignFlowLps).toBeUndefined();
  });

  it("an SI chiller typed in kW is stored as tons (3.516853 kW per ton, REFERENCES.md §2)", () => {
    const parsed = equipmentSchema.parse(
      formToBody(
        "chiller",
        { tag: "CH-2", name: "C2", capacityKW: "1758", refrigerant: "R-513A", compressorType: "screw" },
        "si",
      ),
    );
    if (parsed.kind !== "chiller") throw new Error("kind");
    close(parsed.capacityTons!, 1758 / 3.516853, 1e-3);
  });

  it("an edit sends emptied optional fields as null, and a single-speed tower drops its fan low limit", () => {
    const body = formToBody(
      "cooling_tower",
      {
        tag: "CT-1",
        name: "Tower",
        serves: "",
        capacityTons: "600",
        fanDrive: "single_speed",
        condenserWaterSetpointC: "85",
        fanMinSpeedPct: "20",
        model: "",
      },
      "ip",
      { clearEmpty: true },
    );
    expect(body.serves).toBeNull();
    expect(body.model).toBeNull();
    expect(body.fanMinSpeedPct).toBeNull();
    close(body.condenserWaterSetpointC as number, 29.4444);
  });

  it("a stored SI record reads back into the IP form as typed", () => {
    const values = recordToForm(
      "pump",
      {
        tag: "CHWP-1",
        name: "Pump",
        serves: "CH-1",
        record: {
          designFlowLps: recordFromDisplay(1200, "flowLps", "ip"),
          designHeadKPa: 239.118,
          loop: "chilled_water",
        },
      },
      "ip",
    );
    expect(values).toMatchObject({ designFlowLps: "1200", designHeadKPa: "80", loop: "chilled_water", serves: "CH-1" });
  });
});

describe("an empty add form", () => {
  it("names every field of every kind, so a reset after adding a chiller leaves no serial for the next tower", () => {
    for (const system of ["ip", "si"] as const) {
      const empty = emptyEquipmentForm(system);
      for (const kind of equipmentKinds)
        for (const f of equipmentFields(kind, system)) expect(empty, `${kind}.${f.name}`).toHaveProperty(f.name, "");
      expect(empty).toMatchObject({ tag: "", name: "", serial: "", model: "", year: "" });
      expect(Object.values(empty).every((v) => v === "")).toBe(true);
    }
  });
});
