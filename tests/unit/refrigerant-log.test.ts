import { describe, expect, it } from "vitest";
import {
  annualizedLeakRatePct,
  KG_PER_LB,
  rollingAverageLeakRatePct,
  summarizeRefrigerantLog,
  type RefrigerantEntry,
} from "@/lib/refrigerant-log";
import { refrigerantEntrySchema } from "@/lib/schemas/refrigerant";

// Source of the method: US EPA, 40 CFR §82.152 "leak rate" as used by §82.157 (refrigerant
// management, appliances with 50 lb or more) — recalled, not verified:
//   annualizing method: (lb added ÷ lb full charge) × (365 ÷ shorter of days since the last
//   addition or 365) × 100;
//   rolling average method: lb added over the previous 365 days ÷ lb full charge × 100.
// The worked figures below are done by hand, in pounds, then entered in kg as the log keeps them.

const lb = (pounds: number) => pounds * KG_PER_LB;
const at = (iso: string) => Date.parse(`${iso}T12:00:00Z`);

describe("annualizing method (40 CFR §82.152, recalled)", () => {
  it("500 lb charge, 10 lb added 60 days after the last addition: 12.17 %/yr", () => {
    // Step 1: 10 / 500 = 0.02. Step 2: min(60, 365) / 365 = 0.164384. Step 3: 0.02 / 0.164384 = 0.121667.
    // Step 4: × 100 = 12.17 %.
    expect(annualizedLeakRatePct(lb(10), lb(500), 60)).toBeCloseTo(12.1667, 3);
  });

  it("more than 365 days since the last addition counts as 365: the rate is just the share added", () => {
    // 25 / 500 = 0.05; min(400, 365) / 365 = 1; → 5 %.
    expect(annualizedLeakRatePct(lb(25), lb(500), 400)).toBeCloseTo(5, 9);
  });

  it("rolling average: 25 lb added over the year on a 500 lb charge is 5 %", () => {
    expect(rollingAverageLeakRatePct(lb(25), lb(500))).toBeCloseTo(5, 9);
  });
});

describe("a chiller's log read as figures", () => {
  // A 500 lb (226.80 kg) centrifugal chiller:
  //   2024-01-01 full charge 500 lb after a repair;
  //   2024-03-01 10 lb added (60 days later: 31 days of January + 29 of February 2024);
  //   2024-09-01 17 lb entered, corrected the same day by −2 lb (15 lb really added;
  //             184 days after 2024-03-01: 31+30+31+30+31+31);
  //   2024-09-02 5 lb recovered for a repair, and a leak check that found the leak.
  // Annualizing at 2024-03-01: (10/500) × (365/60) × 100 = 12.1667 %.
  // Annualizing at 2024-09-01: (15/500) × (365/184) × 100 = 0.03 × 1.983696 × 100 = 5.9511 %.
  // Rolling average as of 2024-09-10: (10 + 15) / 500 × 100 = 5 %.
  // Charged since the full charge: 10 + 15 = 25 lb = 11.34 kg; recovered 5 lb.
  const entries: RefrigerantEntry[] = [
    { id: 1, atMs: at("2024-01-01"), kind: "full_charge", amountKg: lb(500), result: null, correctsId: null },
    { id: 2, atMs: at("2024-03-01"), kind: "added", amountKg: lb(10), result: null, correctsId: null },
    { id: 3, atMs: at("2024-09-01"), kind: "added", amountKg: lb(17), result: null, correctsId: null },
    { id: 4, atMs: at("2024-09-01") + 60_000, kind: "correction", amountKg: -lb(2), result: null, correctsId: 3 },
    { id: 5, atMs: at("2024-09-02"), kind: "recovered", amountKg: lb(5), result: null, correctsId: null },
    { id: 6, atMs: at("2024-09-02"), kind: "leak_check", amountKg: null, result: "leak_found", correctsId: null },
  ];
  const summary = summarizeRefrigerantLog(entries, { asOfMs: at("2024-09-10") });

  it("takes the full charge from the latest full-charge entry when the record has none", () => {
    expect(summary.fullChargeSource).toBe("full_charge_entry");
    expect(summary.fullChargeKg! / KG_PER_LB).toBeCloseTo(500, 9);
  });

  it("applies the correction to the entry it names", () => {
    expect(summary.correctedAmountKg[3] / KG_PER_LB).toBeCloseTo(15, 9);
    expect(summary.chargedSinceFullChargeKg / KG_PER_LB).toBeCloseTo(25, 9);
    expect(summary.recoveredSinceFullChargeKg / KG_PER_LB).toBeCloseTo(5, 9);
  });

  it("computes each addition's annualized leak rate from the days since the previous charge", () => {
    expect(summary.additions.map((a) => a.daysSincePrevious)).toEqual([60, 184]);
    expect(summary.additions[0].leakRatePct).toBeCloseTo(12.1667, 3);
    expect(summary.additions[1].leakRatePct).toBeCloseTo(5.9511, 3);
    expect(summary.latestLeakRatePct).toBeCloseTo(5.9511, 3);
    expect(summary.rollingLeakRatePct).toBeCloseTo(5, 9);
    expect(summary.lastLeakCheck?.result).toBe("leak_found");
  });

  it("prefers the chiller record's charge over the log's", () => {
    // 10 lb on a 400 lb nameplate charge after 60 days: (10/400) × (365/60) × 100 = 15.2083 %.
    const s = summarizeRefrigerantLog(entries.slice(0, 2), { recordChargeKg: lb(400), asOfMs: at("2024-03-02") });
    expect(s.fullChargeSource).toBe("equipment_record");
    expect(s.latestLeakRatePct).toBeCloseTo(15.2083, 3);
  });

  it("has no leak rate without a known full charge", () => {
    const s = summarizeRefrigerantLog(entries.slice(1, 2), { asOfMs: at("2024-03-02") });
    expect(s.fullChargeKg).toBeNull();
    expect(s.latestLeakRatePct).toBeNull();
    expect(s.chargedSinceFullChargeKg / KG_PER_LB).toBeCloseTo(10, 9);
  });
});

describe("entry schema", () => {
  it("asks for a positive amount on additions and a result on leak checks", () => {
    expect(refrigerantEntrySchema.safeParse({ kind: "added", amountKg: 0, reason: "top-up" }).success).toBe(false);
    expect(refrigerantEntrySchema.safeParse({ kind: "added", amountKg: 2.5, reason: "top-up" }).success).toBe(true);
    expect(refrigerantEntrySchema.safeParse({ kind: "leak_check", reason: "annual" }).success).toBe(false);
    expect(refrigerantEntrySchema.safeParse({ kind: "leak_check", result: "no_leak", reason: "annual" }).success).toBe(
      true,
    );
    expect(refrigerantEntrySchema.safeParse({ kind: "correction", amountKg: -1, reason: "typo" }).success).toBe(false);
    expect(
      refrigerantEntrySchema.safeParse({ kind: "correction", amountKg: -1, correctsId: 3, reason: "typo" }).success,
    ).toBe(true);
  });
});
