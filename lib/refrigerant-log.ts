// A chiller's refrigerant log read as the figures a technician and the owner need: how much has
// been charged since the last full charge, and the annual leak rate the way the US federal rule
// computes it. The log is append-only; a correction is an entry naming the one it corrects with a
// signed amount, and every figure here uses the corrected amounts.

export const refrigerantEntryKinds = ["added", "recovered", "leak_check", "full_charge", "correction"] as const;
export type RefrigerantEntryKind = (typeof refrigerantEntryKinds)[number];
export const leakCheckResults = ["no_leak", "leak_found"] as const;
export type LeakCheckResult = (typeof leakCheckResults)[number];

/** Kinds whose amount a correction may change. */
export const correctableKinds = [
  "added",
  "recovered",
  "full_charge",
] as const satisfies readonly RefrigerantEntryKind[];

/** The international avoirdupois pound, exactly (international yard and pound agreement, 1959). */
export const KG_PER_LB = 0.45359237;

const DAY_MS = 86_400_000;

/**
 * The leak-rate trigger for comfort-cooling appliances with 50 lb or more of ozone-depleting
 * refrigerant: 10 %/yr (40 CFR §82.157(c), 2016 amendments — recalled, not verified). Commercial
 * refrigeration is 20 % and industrial process refrigeration 30 % under the same paragraph
 * (recalled). Which rule applies to a given chiller and refrigerant (the 2020 amendments, the AIM
 * Act rules for HFCs, state rules) is for the owner and local codes to settle.
 */
export const COMFORT_COOLING_LEAK_RATE_LIMIT_PCT = 10;

export interface RefrigerantEntry {
  id: number;
  atMs: number;
  kind: RefrigerantEntryKind;
  /** kg, positive; for a correction the signed change to the entry it names. */
  amountKg: number | null;
  result: string | null;
  correctsId: number | null;
}

/**
 * Annualizing method — US EPA, 40 CFR §82.152 "leak rate" (used by §82.157), as recalled, not
 * verified:
 *   Step 1: pounds added to return the appliance to a full charge ÷ pounds of the full charge;
 *   Step 2: the shorter of (days since the last day refrigerant was added) and 365, ÷ 365;
 *   Step 3: Step 1 ÷ Step 2;  Step 4: × 100 for a percentage.
 * i.e. leak rate (%/yr) = (added ÷ full charge) × (365 ÷ min(days since last addition, 365)) × 100.
 * The ratio is the same in kg as in lb. Less than a day between additions counts as one day
 * (our choice; the rule counts whole days).
 */
export function annualizedLeakRatePct(addedKg: number, fullChargeKg: number, daysSinceLastAddition: number): number {
  const days = Math.min(Math.max(daysSinceLastAddition, 1), 365);
  return (addedKg / fullChargeKg) * (365 / days) * 100;
}

/**
 * Rolling average method — the rule's alternative (same definition, recalled, not verified): the
 * pounds added over the previous 365 days ÷ the full charge × 100. The rule shortens the period to
 * the time since the last successful follow-up verification test when that is less than 365 days;
 * the log does not mark verification tests, so the full 365 days are used here.
 */
export function rollingAverageLeakRatePct(addedKgLast365Days: number, fullChargeKg: number): number {
  return (addedKgLast365Days / fullChargeKg) * 100;
}

/** Whole days from one time to another, counted as the rule counts them (calendar days apart). */
export function daysBetween(fromMs: number, toMs: number): number {
  return Math.round((toMs - fromMs) / DAY_MS);
}

export interface AdditionFigures {
  entryId: number;
  atMs: number;
  /** After corrections. */
  addedKg: number;
  /** Days since refrigerant was last put in (an addition or a full charge); null for the first. */
  daysSincePrevious: number | null;
  /** Annualizing method at this addition; null without a known full charge. */
  leakRatePct: number | null;
}

export interface RefrigerantSummary {
  fullChargeKg: number | null;
  fullChargeSource: "equipment_record" | "full_charge_entry" | null;
  lastFullChargeAtMs: number | null;
  /** Added since the last full charge (all of the log when there is none), corrections applied. */
  chargedSinceFullChargeKg: number;
  recoveredSinceFullChargeKg: number;
  additions: AdditionFigures[];
  /** The annualizing method at the latest addition. */
  latestLeakRatePct: number | null;
  /** The rolling average method over the 365 days before `asOfMs`. */
  rollingLeakRatePct: number | null;
  leakRateLimitPct: number;
  lastLeakCheck: { atMs: number; result: string | null } | null;
  /** Each entry's amount after the corrections naming it (corrections themselves are left out). */
  correctedAmountKg: Record<number, number>;
}

/** The amount of every correctable entry after the corrections that name it; never below zero. */
export function correctedAmounts(entries: readonly RefrigerantEntry[]): Map<number, number> {
  const amounts = new Map<number, number>();
  for (const e of entries)
    if (e.kind !== "correction" && e.kind !== "leak_check" && e.amountKg !== null) amounts.set(e.id, e.amountKg);
  for (const e of entries) {
    if (e.kind !== "correction" || e.correctsId === null || e.amountKg === null) continue;
    const before = amounts.get(e.correctsId);
    if (before !== undefined) amounts.set(e.correctsId, before + e.amountKg);
  }
  // A correction that takes an entry to zero or below voids it; a negative charge means nothing.
  for (const [id, kg] of amounts) if (kg < 0) amounts.set(id, 0);
  return amounts;
}

/**
 * The log's figures as of `asOfMs`. `recordChargeKg` is the full charge from the chiller's record
 * (nameplate); without it the latest full-charge entry's amount stands in.
 */
export function summarizeRefrigerantLog(
  entries: readonly RefrigerantEntry[],
  opts: { recordChargeKg?: number | null; asOfMs: number },
): RefrigerantSummary {
  const sorted = [...entries].sort((a, b) => a.atMs - b.atMs || a.id - b.id);
  const amounts = correctedAmounts(sorted);
  const amountOf = (e: RefrigerantEntry) => amounts.get(e.id) ?? 0;

  const fullCharges = sorted.filter((e) => e.kind === "full_charge" && amountOf(e) > 0);
  const lastFullCharge = fullCharges.at(-1) ?? null;
  const recordCharge = opts.recordChargeKg && opts.recordChargeKg > 0 ? opts.recordChargeKg : null;
  const fullChargeKg = recordCharge ?? (lastFullCharge ? amountOf(lastFullCharge) : null);
  const fullChargeSource = recordCharge ? "equipment_record" : lastFullCharge ? "full_charge_entry" : null;

  const sinceFull = lastFullCharge ? sorted.filter((e) => e.atMs >= lastFullCharge.atMs) : sorted;
  const sum = (list: RefrigerantEntry[], kind: RefrigerantEntryKind) =>
    list.filter((e) => e.kind === kind).reduce((n, e) => n + amountOf(e), 0);

  // The clock of "days since the last addition" restarts with any charge put in, a full charge included.
  const additions: AdditionFigures[] = [];
  let previousChargeAtMs: number | null = null;
  for (const e of sorted) {
    if (e.kind === "full_charge" && amountOf(e) > 0) previousChargeAtMs = e.atMs;
    if (e.kind !== "added" || amountOf(e) <= 0) continue;
    const days = previousChargeAtMs === null ? null : daysBetween(previousChargeAtMs, e.atMs);
    additions.push({
      entryId: e.id,
      atMs: e.atMs,
      addedKg: amountOf(e),
      daysSincePrevious: days,
      // With no earlier charge on record, the period is taken as the rule's longest, 365 days.
      leakRatePct: fullChargeKg === null ? null : annualizedLeakRatePct(amountOf(e), fullChargeKg, days ?? 365),
    });
    previousChargeAtMs = e.atMs;
  }

  const yearAgo = opts.asOfMs - 365 * DAY_MS;
  const addedLastYear = additions.filter((a) => a.atMs > yearAgo && a.atMs <= opts.asOfMs);
  const leakChecks = sorted.filter((e) => e.kind === "leak_check");
  const lastCheck = leakChecks.at(-1) ?? null;

  return {
    fullChargeKg,
    fullChargeSource,
    lastFullChargeAtMs: lastFullCharge?.atMs ?? null,
    chargedSinceFullChargeKg: sum(sinceFull, "added"),
    recoveredSinceFullChargeKg: sum(sinceFull, "recovered"),
    additions,
    latestLeakRatePct: additions.at(-1)?.leakRatePct ?? null,
    rollingLeakRatePct:
      fullChargeKg === null
        ? null
        : rollingAverageLeakRatePct(
            addedLastYear.reduce((n, a) => n + a.addedKg, 0),
            fullChargeKg,
          ),
    leakRateLimitPct: COMFORT_COOLING_LEAK_RATE_LIMIT_PCT,
    lastLeakCheck: lastCheck ? { atMs: lastCheck.atMs, result: lastCheck.result } : null,
    correctedAmountKg: Object.fromEntries(amounts),
  };
}
