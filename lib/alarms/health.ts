// Alarm-system health after ISA-18.2 / EEMUA 191 (REFERENCES.md §7): rates per on-call
// person, floods, most frequent alarms, chattering, stale alarms and the priority split.

import { priorities, priorityMeanings, type Priority } from "./priority";
import type { Alarm, TransitionRecord } from "./state-machine";

const TEN_MIN_MS = 600_000;

export interface HealthThresholds {
  /** EEMUA 191 / ISA-18.2 [C]: < 1 per 10 min per operator acceptable, 1–2 manageable. */
  acceptablePer10Min: number;
  manageablePer10Min: number;
  /** Flood [C]: more than 10 in 10 minutes; ends below 5 per 10 minutes. */
  floodStartAbove: number;
  floodEndBelow: number;
  /** Chattering: common test ≥ 3 transitions in 60 s [M]. */
  chatterTransitions: number;
  chatterWindowS: number;
  /** Stale: active longer than 24 h [M]. */
  staleAfterS: number;
  topN: number;
}

export const defaultHealthThresholds: HealthThresholds = {
  acceptablePer10Min: 1,
  manageablePer10Min: 2,
  floodStartAbove: 10,
  floodEndBelow: 5,
  chatterTransitions: 3,
  chatterWindowS: 60,
  staleAfterS: 24 * 3600,
  topN: 10,
};

/** An alarm annunciated because its condition went active. */
export interface Activation {
  alarmKey: string;
  ruleId: string;
  equipment: string;
  priority: Priority;
  atMs: number;
}

export function activationsOf(records: readonly TransitionRecord[]): Activation[] {
  return records
    .filter((r) => r.cause === "condition_active" && r.to === "unacknowledged")
    .map((r) => ({
      alarmKey: r.alarmKey,
      ruleId: r.ruleId,
      equipment: r.equipment,
      priority: r.priority,
      atMs: r.atMs,
    }))
    .sort((a, b) => a.atMs - b.atMs);
}

export interface Flood {
  startMs: number;
  endMs: number;
  ongoing: boolean;
  activations: number;
}

export function findFloods(
  times: readonly number[],
  toMs: number,
  t: HealthThresholds = defaultHealthThresholds,
): Flood[] {
  const sorted = [...times].sort((a, b) => a - b);
  // The trailing 10-min count only changes when an activation enters or leaves the window.
  const candidates = [...new Set([...sorted, ...sorted.map((x) => x + TEN_MIN_MS)])]
    .filter((c) => c <= toMs)
    .sort((a, b) => a - b);
  const countAt = (c: number) => sorted.filter((x) => x > c - TEN_MIN_MS && x <= c).length;
  const floods: Flood[] = [];
  let open: number | null = null;
  for (const c of candidates) {
    const n = countAt(c);
    if (open === null && n > t.floodStartAbove) open = c;
    else if (open !== null && n < t.floodEndBelow) {
      const start = open;
      floods.push({
        startMs: start,
        endMs: c,
        ongoing: false,
        activations: sorted.filter((x) => x > start - TEN_MIN_MS && x <= c).length,
      });
      open = null;
    }
  }
  if (open !== null) {
    const start = open;
    floods.push({
      startMs: start,
      endMs: toMs,
      ongoing: true,
      activations: sorted.filter((x) => x > start - TEN_MIN_MS && x <= toMs).length,
    });
  }
  return floods;
}

export interface AlarmHealth {
  fromMs: number;
  toMs: number;
  onCallPeople: number;
  activations: number;
  rate: {
    averagePer10MinPerPerson: number;
    peakPer10MinPerPerson: number;
    assessment: "acceptable" | "manageable" | "overloaded";
  };
  floods: Flood[];
  timeInFloodFraction: number;
  topAlarms: { alarmKey: string; ruleId: string; equipment: string; count: number; share: number }[];
  topShare: number;
  chattering: {
    alarmKey: string;
    ruleId: string;
    equipment: string;
    maxTransitionsInWindow: number;
    firstAtMs: number;
  }[];
  stale: { alarmKey: string; ruleId: string; equipment: string; activeSinceMs: number; activeForS: number }[];
  priorityDistribution: {
    priority: Priority;
    label: string;
    count: number;
    share: number;
    target: string;
    withinGuidance: boolean;
  }[];
}

function withinTarget(p: Priority, share: number): boolean {
  const target = priorityMeanings[p].targetShare;
  // "approx" targets: within half the target either way is read as in line with the guidance.
  return "max" in target ? share <= target.max : Math.abs(share - target.approx) <= target.approx / 2;
}

export function computeAlarmHealth(args: {
  records: readonly TransitionRecord[];
  alarms?: readonly Alarm[];
  fromMs: number;
  toMs: number;
  onCallPeople: number;
  thresholds?: Partial<HealthThresholds>;
}): AlarmHealth {
  const t = { ...defaultHealthThresholds, ...args.thresholds };
  const people = Math.max(1, args.onCallPeople);
  const inRange = args.records.filter((r) => r.atMs >= args.fromMs && r.atMs <= args.toMs);
  const acts = activationsOf(inRange);
  const periodMs = Math.max(1, args.toMs - args.fromMs);

  const buckets = new Map<number, number>();
  for (const a of acts) {
    const b = Math.floor((a.atMs - args.fromMs) / TEN_MIN_MS);
    buckets.set(b, (buckets.get(b) ?? 0) + 1);
  }
  const average = acts.length / (periodMs / TEN_MIN_MS) / people;
  const peak = Math.max(0, ...buckets.values()) / people;
  const assessment =
    average < t.acceptablePer10Min ? "acceptable" : average <= t.manageablePer10Min ? "manageable" : "overloaded";

  const floods = findFloods(
    acts.map((a) => a.atMs),
    args.toMs,
    t,
  );
  const floodMs = floods.reduce((s, f) => s + (f.endMs - f.startMs), 0);

  const byKey = new Map<string, Activation[]>();
  for (const a of acts) byKey.set(a.alarmKey, [...(byKey.get(a.alarmKey) ?? []), a]);
  const topAlarms = [...byKey.entries()]
    .map(([alarmKey, list]) => ({
      alarmKey,
      ruleId: list[0].ruleId,
      equipment: list[0].equipment,
      count: list.length,
      share: list.length / acts.length,
    }))
    .sort((a, b) => b.count - a.count || a.alarmKey.localeCompare(b.alarmKey))
    .slice(0, t.topN);

  // Chattering counts condition changes, shown or hidden, within a short window.
  const changes = new Map<string, TransitionRecord[]>();
  for (const r of inRange)
    if (r.cause === "condition_active" || r.cause === "condition_cleared")
      changes.set(r.alarmKey, [...(changes.get(r.alarmKey) ?? []), r]);
  const chattering: AlarmHealth["chattering"] = [];
  for (const [alarmKey, list] of changes) {
    const times = list.map((r) => r.atMs).sort((a, b) => a - b);
    let best = 0;
    let firstAtMs = 0;
    for (let i = 0, j = 0; j < times.length; j++) {
      while (times[j] - times[i] > t.chatterWindowS * 1000) i++;
      if (j - i + 1 > best) [best, firstAtMs] = [j - i + 1, times[i]];
    }
    if (best >= t.chatterTransitions)
      chattering.push({
        alarmKey,
        ruleId: list[0].ruleId,
        equipment: list[0].equipment,
        maxTransitionsInWindow: best,
        firstAtMs,
      });
  }

  const stale = (args.alarms ?? [])
    .filter(
      (a) => a.conditionActive && a.conditionSinceMs !== null && args.toMs - a.conditionSinceMs > t.staleAfterS * 1000,
    )
    .map((a) => ({
      alarmKey: a.key,
      ruleId: a.ruleId,
      equipment: a.equipment,
      activeSinceMs: a.conditionSinceMs!,
      activeForS: (args.toMs - a.conditionSinceMs!) / 1000,
    }));

  const priorityDistribution = priorities.map((p) => {
    const count = acts.filter((a) => a.priority === p).length;
    const share = acts.length ? count / acts.length : 0;
    const target = priorityMeanings[p].targetShare;
    return {
      priority: p,
      label: priorityMeanings[p].label,
      count,
      share,
      target: "max" in target ? `≤ ${target.max * 100} %` : `≈ ${target.approx * 100} %`,
      withinGuidance: acts.length === 0 || withinTarget(p, share),
    };
  });

  return {
    fromMs: args.fromMs,
    toMs: args.toMs,
    onCallPeople: people,
    activations: acts.length,
    rate: { averagePer10MinPerPerson: average, peakPer10MinPerPerson: peak, assessment },
    floods,
    timeInFloodFraction: floodMs / periodMs,
    topAlarms,
    topShare: topAlarms.reduce((s, a) => s + a.share, 0),
    chattering,
    stale,
    priorityDistribution,
  };
}
