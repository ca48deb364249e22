// Re-runs a site's rules over stored readings, on the same evaluation schedule as the live
// server (./schedule.ts), so the alarm transitions of a window can be reproduced and compared
// with what was recorded. Pure: the caller reads the readings, settings and limits.

import type { TransitionRecord } from "@/lib/alarms/state-machine";
import type { Reading, Site } from "@/lib/plant/site";
import { createSiteMonitor } from "./runner";
import { evaluationTimes } from "./schedule";
import type { RuleSettings } from "./settings";

/** Causes an evaluation produces; the rest (acknowledge, shelve…) are a person's, which a replay cannot know. */
export const RULE_CAUSES: ReadonlySet<string> = new Set([
  "condition_active",
  "condition_cleared",
  "suppressed",
  "unsuppressed",
]);

export interface RuleReplayArgs {
  site: Site;
  settings: RuleSettings;
  timeZone?: string;
  /**
   * Readings in ascending event time from the warm-up start to `toMs`: those before `fromMs`
   * fill the history and the on/off delays as the live monitor had them, without being reported.
   */
  readings: readonly Reading[];
  fromMs: number;
  toMs: number;
}

export interface RuleReplay {
  /** Transitions with fromMs ≤ atMs ≤ toMs, in order. */
  transitions: TransitionRecord[];
  /** How many evaluations ran (warm-up included). */
  evaluations: number;
}

export function replayRules(args: RuleReplayArgs): RuleReplay {
  const monitor = createSiteMonitor({ site: args.site, settings: args.settings, timeZone: args.timeZone });
  const inRange = args.readings.filter((r) => r.tsMs <= args.toMs);
  const times = evaluationTimes(
    -Infinity,
    inRange.map((r) => r.tsMs),
  );
  const transitions: TransitionRecord[] = [];
  let next = 0;
  for (const atMs of times) {
    // Everything up to the evaluation time is in the history (later readings are never read).
    const start = next;
    while (next < inRange.length && inRange[next].tsMs <= atMs) next++;
    monitor.ingest(inRange.slice(start, next));
    for (const t of monitor.evaluate(atMs).transitions) if (t.atMs >= args.fromMs) transitions.push(t);
  }
  return { transitions, evaluations: times.length };
}

/** What two transition lists are compared on: the rule, its key, the states, the cause and the event time. */
export interface TransitionKey {
  alarmKey: string;
  from: string;
  to: string;
  cause: string;
  atMs: number;
}

const keyOf = (t: TransitionKey) => `${t.atMs} ${t.alarmKey} ${t.from}→${t.to} (${t.cause})`;

/**
 * The differences between recorded and replayed transitions (rule-caused ones only), as lines a
 * person can read; empty when they agree.
 */
export function diffTransitions(recorded: readonly TransitionKey[], replayed: readonly TransitionKey[]): string[] {
  const count = (list: readonly TransitionKey[]) => {
    const m = new Map<string, number>();
    for (const t of list) if (RULE_CAUSES.has(t.cause)) m.set(keyOf(t), (m.get(keyOf(t)) ?? 0) + 1);
    return m;
  };
  const a = count(recorded);
  const b = count(replayed);
  const out: string[] = [];
  for (const k of new Set([...a.keys(), ...b.keys()])) {
    const d = (a.get(k) ?? 0) - (b.get(k) ?? 0);
    if (d > 0) out.push(`recorded only: ${k}${d > 1 ? ` ×${d}` : ""}`);
    if (d < 0) out.push(`replayed only: ${k}${d < -1 ? ` ×${-d}` : ""}`);
  }
  return out.sort((x, y) => Number(x.split(" ")[2]) - Number(y.split(" ")[2]));
}
