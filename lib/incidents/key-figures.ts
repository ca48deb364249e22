// The numbers a review opens with: how early the rules warned, how fast people answered, how close
// the loops came. Pure: plain data in (members, people's entries, sampled series), figures out.
// The drills' debrief calls this too.

export interface KeyFigureMember {
  ruleId: string;
  equipment: string;
  activeSinceMs: number;
  clearedAtMs: number | null;
}

export interface TimedSeries {
  tsMs: readonly number[];
  values: readonly number[];
}

export interface KeyFigureInput {
  members: readonly KeyFigureMember[];
  /** Event times people acknowledged one of the incident's alarms. */
  acknowledgedAtMs: readonly number[];
  /** Event times of people's other entries: notes, temporary changes, visit entries, shelving, drill commands. */
  actionAtMs: readonly number[];
  /** Crossover margin, condenser water entering minus chilled water entering (K); ≤ 0 is crossed. */
  marginK?: TimedSeries | null;
  driveTempC?: TimedSeries | null;
}

export interface KeyFigures {
  startedAtMs: number | null;
  firstWarning: { ruleId: string; atMs: number } | null;
  /** Where the warning lead ends: the loops crossing (margin ≤ 0, else the crossed alarm), or recovery. */
  leadEnd: { kind: "crossing" | "recovery"; atMs: number } | null;
  warningLeadS: number | null;
  timeToAcknowledgeS: number | null;
  timeToFirstActionS: number | null;
  /** From the first activation until every member returned to normal; null while any is active. */
  timeToRecoveryS: number | null;
  lowestMargin: { valueK: number; atMs: number } | null;
  highestDriveTemp: { valueC: number; atMs: number } | null;
}

/** The rules that warn of a crossover ahead of it (lib/rules/README.md rules 1 and 2). */
export const crossoverWarningRules = ["crossover_risk", "restart_race"] as const;

const seconds = (fromMs: number, toMs: number) => Math.round((toMs - fromMs) / 1000);

function firstAtOrAfter(times: readonly number[], fromMs: number): number | null {
  let best: number | null = null;
  for (const t of times) if (t >= fromMs && (best === null || t < best)) best = t;
  return best;
}

function extreme(series: TimedSeries | null | undefined, pick: "min" | "max"): { value: number; atMs: number } | null {
  if (!series) return null;
  let out: { value: number; atMs: number } | null = null;
  for (let i = 0; i < series.tsMs.length; i++) {
    const v = series.values[i];
    if (!Number.isFinite(v)) continue;
    if (!out || (pick === "min" ? v < out.value : v > out.value)) out = { value: v, atMs: series.tsMs[i] };
  }
  return out;
}

export function keyFigures(input: KeyFigureInput): KeyFigures {
  const { members } = input;
  const startedAtMs = members.length ? Math.min(...members.map((m) => m.activeSinceMs)) : null;
  const warnings = members
    .filter((m) => (crossoverWarningRules as readonly string[]).includes(m.ruleId))
    .sort((a, b) => a.activeSinceMs - b.activeSinceMs);
  const firstWarning = warnings.length ? { ruleId: warnings[0].ruleId, atMs: warnings[0].activeSinceMs } : null;

  let leadEnd: KeyFigures["leadEnd"] = null;
  if (firstWarning) {
    const m = input.marginK;
    let crossingMs: number | null = null;
    if (m)
      for (let i = 0; i < m.tsMs.length && crossingMs === null; i++)
        if (m.tsMs[i] >= firstWarning.atMs && m.values[i] <= 0) crossingMs = m.tsMs[i];
    crossingMs ??= firstAtOrAfter(
      members.filter((x) => x.ruleId === "loops_crossed").map((x) => x.activeSinceMs),
      firstWarning.atMs,
    );
    if (crossingMs !== null) leadEnd = { kind: "crossing", atMs: crossingMs };
    else {
      // No crossing: the warning led to recovery, when the last crossover warning returned to normal.
      const clears = warnings.map((w) => w.clearedAtMs);
      if (clears.every((c) => c !== null)) leadEnd = { kind: "recovery", atMs: Math.max(...(clears as number[])) };
    }
  }

  const ack = startedAtMs === null ? null : firstAtOrAfter(input.acknowledgedAtMs, startedAtMs);
  const action = startedAtMs === null ? null : firstAtOrAfter(input.actionAtMs, startedAtMs);
  const allClear = members.length > 0 && members.every((m) => m.clearedAtMs !== null);
  const recoveredAtMs = allClear ? Math.max(...members.map((m) => m.clearedAtMs!)) : null;
  const low = extreme(input.marginK, "min");
  const high = extreme(input.driveTempC, "max");

  return {
    startedAtMs,
    firstWarning,
    leadEnd,
    warningLeadS: firstWarning && leadEnd ? seconds(firstWarning.atMs, leadEnd.atMs) : null,
    timeToAcknowledgeS: startedAtMs !== null && ack !== null ? seconds(startedAtMs, ack) : null,
    timeToFirstActionS: startedAtMs !== null && action !== null ? seconds(startedAtMs, action) : null,
    timeToRecoveryS: startedAtMs !== null && recoveredAtMs !== null ? seconds(startedAtMs, recoveredAtMs) : null,
    lowestMargin: low && { valueK: low.value, atMs: low.atMs },
    highestDriveTemp: high && { valueC: high.value, atMs: high.atMs },
  };
}

/** Pairs two sampled series by time (each value with the other's latest) and applies `f`. */
export function pairSeries(a: TimedSeries, b: TimedSeries, f: (a: number, b: number) => number): TimedSeries {
  const tsMs: number[] = [];
  const values: number[] = [];
  let i = 0;
  let j = 0;
  let lastA: number | null = null;
  let lastB: number | null = null;
  while (i < a.tsMs.length || j < b.tsMs.length) {
    const ta = i < a.tsMs.length ? a.tsMs[i] : Infinity;
    const tb = j < b.tsMs.length ? b.tsMs[j] : Infinity;
    const t = Math.min(ta, tb);
    if (ta === t) lastA = a.values[i++];
    if (tb === t) lastB = b.values[j++];
    if (lastA !== null && lastB !== null) {
      tsMs.push(t);
      values.push(f(lastA, lastB));
    }
  }
  return { tsMs, values };
}
