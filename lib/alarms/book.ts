// A site's alarms keyed by rule and equipment. Feeds rule conditions (already through
// their on/off delays) into the state machine and returns every transition record.

import type { Priority } from "./priority";
import {
  alarmKey,
  newAlarm,
  stepAlarm,
  type Actor,
  type Alarm,
  type AlarmEvent,
  type AlarmStepResult,
  type TransitionRecord,
} from "./state-machine";

export type AlarmBook = ReadonlyMap<string, Alarm>;

/** What the book needs from a rule's condition. */
export interface ConditionInput {
  ruleId: string;
  equipment: string;
  active: boolean;
  priority: Priority;
  latching?: boolean;
  /** Set while plant state makes this alarm meaningless (suppression by design). */
  suppressedReason?: string | null;
}

export function emptyAlarmBook(): AlarmBook {
  return new Map();
}

/**
 * Applies conditions observed at `atMs`. Suppression is applied before the condition so an
 * alarm that becomes meaningless is hidden before it could annunciate. Also expires shelves.
 */
export function applyConditions(
  book: AlarmBook,
  conditions: readonly ConditionInput[],
  atMs: number,
): { book: AlarmBook; transitions: TransitionRecord[] } {
  // Copied on the first change only: most evaluations change nothing.
  let next: Map<string, Alarm> | null = null;
  const current = (): AlarmBook => next ?? book;
  const put = (key: string, a: Alarm) => {
    if (current().get(key) === a) return;
    next ??= new Map(book);
    next.set(key, a);
  };
  const transitions: TransitionRecord[] = [];
  const seen = new Set<string>();
  const apply = (a: Alarm, e: AlarmEvent): Alarm => {
    const r = stepAlarm(a, e);
    transitions.push(...r.transitions);
    return r.alarm;
  };
  for (const c of conditions) {
    const key = alarmKey(c.ruleId, c.equipment);
    seen.add(key);
    const known = current().get(key);
    // The usual case, a condition that has not changed on an alarm with no shelf to expire:
    // every step below would return it as it is, so none is taken (each allocates).
    if (known && unchanged(known, c)) continue;
    let a = known ?? newAlarm(c);
    // Priority may change with settings; it is re-read on each evaluation.
    if (a.priority !== c.priority) a = { ...a, priority: c.priority };
    a = apply(a, { type: "tick", atMs });
    const reason = c.suppressedReason ?? null;
    if (reason !== null && a.suppressedReason !== reason) a = apply(a, { type: "suppress", atMs, reason });
    if (reason === null && a.suppressedReason !== null) {
      // Lift suppression after recording the condition so a clear condition returns to normal quietly.
      a = apply(a, { type: "condition", atMs, active: c.active });
      a = apply(a, { type: "unsuppress", atMs });
    } else {
      a = apply(a, { type: "condition", atMs, active: c.active });
    }
    put(key, a);
  }
  // A tick only expires shelves.
  for (const [key, a] of book) if (a.shelf && !seen.has(key)) put(key, apply(a, { type: "tick", atMs }));
  return { book: next ?? book, transitions };
}

/** True when applying `c` to `a` would change nothing and record nothing. */
function unchanged(a: Alarm, c: ConditionInput): boolean {
  return (
    a.shelf === null &&
    a.priority === c.priority &&
    a.conditionActive === c.active &&
    a.suppressedReason === null &&
    (c.suppressedReason ?? null) === null
  );
}

/** A person's command on one alarm (acknowledge, shelve, unshelve, out of service…). */
export function commandAlarm(book: AlarmBook, key: string, event: AlarmEvent): { book: AlarmBook } & AlarmStepResult {
  const a = book.get(key);
  if (!a)
    return {
      book,
      alarm: newAlarm({ ruleId: "unknown", equipment: key, priority: 4 }),
      transitions: [],
      rejected: "no such alarm",
    };
  const r = stepAlarm(a, event);
  const next = new Map(book);
  next.set(key, r.alarm);
  return { book: next, ...r };
}

export function acknowledge(book: AlarmBook, key: string, atMs: number, actor: Actor, note?: string) {
  return commandAlarm(book, key, { type: "acknowledge", atMs, actor, note });
}

export function shelve(book: AlarmBook, key: string, atMs: number, actor: Actor, minutes: number, reason: string) {
  return commandAlarm(book, key, { type: "shelve", atMs, actor, untilMs: atMs + minutes * 60_000, reason });
}
