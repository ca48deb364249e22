// The ANSI/ISA-18.2 alarm lifecycle as a pure reducer: an alarm and an event in, the next
// alarm and the transition records out. Records are for an append-only audit trail; the
// caller stores them and adds wall time. All times are event time.
//
//   normal ──active──▶ unacknowledged ──ack──▶ acknowledged ──clear──▶ normal
//                           │ clear                  │ clear (latching alarm)
//                           ▼                        ▼
//                returned_unacknowledged ─ack▶ normal    latched ─ack▶ normal
//
// Shelved, suppressed by design and out of service hide the alarm while the condition
// keeps being tracked; when the last of them lifts the alarm is re-evaluated: active →
// unacknowledged, else normal. Precedence when several apply: out of service, suppressed, shelved.

import type { Priority } from "./priority";
import type { AlarmState } from "./states";

export type Actor = { kind: "system" } | { kind: "person"; id: string };
export const systemActor: Actor = { kind: "system" };

type AnnunciationState = "normal" | "unacknowledged" | "acknowledged" | "returned_unacknowledged" | "latched";

export interface Shelf {
  untilMs: number;
  reason: string;
  by: Actor;
}

export interface Alarm {
  key: string;
  ruleId: string;
  equipment: string;
  priority: Priority;
  /** Holds after the condition clears until someone acknowledges it. */
  latching: boolean;
  state: AlarmState;
  annunciation: AnnunciationState;
  conditionActive: boolean;
  conditionSinceMs: number | null;
  shelf: Shelf | null;
  suppressedReason: string | null;
  outOfService: { reason: string; by: Actor } | null;
  lastTransitionMs: number | null;
}

export type AlarmEvent =
  | { type: "condition"; atMs: number; active: boolean }
  | { type: "acknowledge"; atMs: number; actor: Actor; note?: string }
  | { type: "shelve"; atMs: number; actor: Actor; untilMs: number; reason: string; note?: string }
  | { type: "unshelve"; atMs: number; actor: Actor; note?: string }
  | { type: "tick"; atMs: number }
  | { type: "suppress"; atMs: number; reason: string }
  | { type: "unsuppress"; atMs: number }
  | { type: "remove_from_service"; atMs: number; actor: Actor; reason: string }
  | { type: "return_to_service"; atMs: number; actor: Actor; note?: string };

export type TransitionCause =
  | "condition_active"
  | "condition_cleared"
  | "acknowledged"
  | "shelved"
  | "unshelved"
  | "shelf_expired"
  | "suppressed"
  | "unsuppressed"
  | "removed_from_service"
  | "returned_to_service";

export interface TransitionRecord {
  alarmKey: string;
  ruleId: string;
  equipment: string;
  priority: Priority;
  from: AlarmState;
  to: AlarmState;
  cause: TransitionCause;
  atMs: number;
  actor: Actor;
  note: string | null;
  /** The process condition after this transition. */
  conditionActive: boolean;
}

export interface AlarmStepResult {
  alarm: Alarm;
  transitions: TransitionRecord[];
  /** Why a person's command was refused; the alarm is unchanged. */
  rejected?: string;
}

export function alarmKey(ruleId: string, equipment: string): string {
  return `${ruleId}:${equipment}`;
}

export function newAlarm(args: { ruleId: string; equipment: string; priority: Priority; latching?: boolean }): Alarm {
  return {
    key: alarmKey(args.ruleId, args.equipment),
    ruleId: args.ruleId,
    equipment: args.equipment,
    priority: args.priority,
    latching: args.latching ?? false,
    state: "normal",
    annunciation: "normal",
    conditionActive: false,
    conditionSinceMs: null,
    shelf: null,
    suppressedReason: null,
    outOfService: null,
    lastTransitionMs: null,
  };
}

function displayedState(a: Omit<Alarm, "state">): AlarmState {
  if (a.outOfService) return "out_of_service";
  if (a.suppressedReason !== null) return "suppressed_by_design";
  if (a.shelf) return "shelved";
  return a.annunciation;
}

const hidden = (a: Alarm): boolean => a.outOfService !== null || a.suppressedReason !== null || a.shelf !== null;

/** Re-derive the shown state; when nothing hides the alarm any more, re-evaluate it from the condition. */
function settle(a: Alarm, wasHidden: boolean): Alarm {
  let next = a;
  if (wasHidden && !hidden(next)) next = { ...next, annunciation: next.conditionActive ? "unacknowledged" : "normal" };
  return { ...next, state: displayedState(next) };
}

function record(
  before: Alarm,
  after: Alarm,
  cause: TransitionCause,
  atMs: number,
  actor: Actor,
  note?: string | null,
): TransitionRecord {
  return {
    alarmKey: after.key,
    ruleId: after.ruleId,
    equipment: after.equipment,
    priority: after.priority,
    from: before.state,
    to: after.state,
    cause,
    atMs,
    actor,
    note: note ?? null,
    conditionActive: after.conditionActive,
  };
}

function expireShelf(a: Alarm, atMs: number): AlarmStepResult {
  if (!a.shelf || atMs < a.shelf.untilMs) return { alarm: a, transitions: [] };
  const after = settle({ ...a, shelf: null, lastTransitionMs: a.shelf.untilMs }, true);
  return {
    alarm: after,
    transitions: [record(a, after, "shelf_expired", a.shelf.untilMs, systemActor, a.shelf.reason)],
  };
}

function onCondition(a: Alarm, active: boolean, atMs: number): Alarm {
  if (active === a.conditionActive) return a;
  let annunciation = a.annunciation;
  if (!hidden(a)) {
    if (active) annunciation = annunciation === "acknowledged" ? "acknowledged" : "unacknowledged";
    else if (annunciation === "unacknowledged") annunciation = a.latching ? "latched" : "returned_unacknowledged";
    else if (annunciation === "acknowledged") annunciation = a.latching ? "latched" : "normal";
  }
  return settle(
    { ...a, annunciation, conditionActive: active, conditionSinceMs: active ? atMs : null, lastTransitionMs: atMs },
    false,
  );
}

const reject = (a: Alarm, why: string): AlarmStepResult => ({ alarm: a, transitions: [], rejected: why });

/** Applies one event. Any event at or after a shelf's expiry first expires the shelf. */
export function stepAlarm(alarm: Alarm, event: AlarmEvent): AlarmStepResult {
  const expired = expireShelf(alarm, event.atMs);
  const a = expired.alarm;
  const pre = expired.transitions;
  const done = (after: Alarm, cause: TransitionCause, actor: Actor, note?: string | null): AlarmStepResult => ({
    alarm: after,
    transitions: [...pre, record(a, after, cause, event.atMs, actor, note)],
  });
  const wasHidden = hidden(a);

  switch (event.type) {
    case "tick":
      return expired;
    case "condition": {
      const after = onCondition(a, event.active, event.atMs);
      if (after === a) return expired;
      return done(after, event.active ? "condition_active" : "condition_cleared", systemActor);
    }
    case "acknowledge": {
      if (wasHidden) return { ...reject(a, `cannot acknowledge while ${a.state}`), transitions: pre };
      const next: Record<AnnunciationState, AnnunciationState | null> = {
        normal: null,
        acknowledged: null,
        unacknowledged: "acknowledged",
        returned_unacknowledged: "normal",
        latched: a.conditionActive ? "acknowledged" : "normal",
      };
      const to = next[a.annunciation];
      if (!to) return { ...reject(a, "nothing to acknowledge"), transitions: pre };
      return done(
        settle({ ...a, annunciation: to, lastTransitionMs: event.atMs }, false),
        "acknowledged",
        event.actor,
        event.note,
      );
    }
    case "shelve": {
      if (a.outOfService) return { ...reject(a, "out of service"), transitions: pre };
      if (!event.reason.trim()) return { ...reject(a, "a shelving reason is required"), transitions: pre };
      if (event.untilMs <= event.atMs) return { ...reject(a, "shelving must end in the future"), transitions: pre };
      const shelf: Shelf = { untilMs: event.untilMs, reason: event.reason, by: event.actor };
      return done(
        settle({ ...a, shelf, lastTransitionMs: event.atMs }, wasHidden),
        "shelved",
        event.actor,
        event.note ?? event.reason,
      );
    }
    case "unshelve": {
      if (!a.shelf) return { ...reject(a, "not shelved"), transitions: pre };
      return done(
        settle({ ...a, shelf: null, lastTransitionMs: event.atMs }, wasHidden),
        "unshelved",
        event.actor,
        event.note,
      );
    }
    case "suppress": {
      if (a.suppressedReason === event.reason) return expired;
      return done(
        settle({ ...a, suppressedReason: event.reason, lastTransitionMs: event.atMs }, wasHidden),
        "suppressed",
        systemActor,
        event.reason,
      );
    }
    case "unsuppress": {
      if (a.suppressedReason === null) return expired;
      return done(
        settle({ ...a, suppressedReason: null, lastTransitionMs: event.atMs }, wasHidden),
        "unsuppressed",
        systemActor,
      );
    }
    case "remove_from_service": {
      if (a.outOfService) return { ...reject(a, "already out of service"), transitions: pre };
      if (!event.reason.trim()) return { ...reject(a, "a reason is required"), transitions: pre };
      return done(
        settle(
          { ...a, outOfService: { reason: event.reason, by: event.actor }, lastTransitionMs: event.atMs },
          wasHidden,
        ),
        "removed_from_service",
        event.actor,
        event.reason,
      );
    }
    case "return_to_service": {
      if (!a.outOfService) return { ...reject(a, "not out of service"), transitions: pre };
      return done(
        settle({ ...a, outOfService: null, lastTransitionMs: event.atMs }, wasHidden),
        "returned_to_service",
        event.actor,
        event.note,
      );
    }
  }
}
