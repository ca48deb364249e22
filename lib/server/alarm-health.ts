import type { Db } from "@/db/client";
import { allAlarmMachines, transitionsSince } from "@/db/queries/alarms";
import { computeAlarmHealth, type AlarmHealth, type Priority, type TransitionRecord } from "@/lib/alarms";

/** Alarm-system health over the last `days`, from the stored audit trail (ISA-18.2 / EEMUA 191). */
export function alarmHealthReport(db: Db, nowMs: number, days = 7): AlarmHealth {
  const fromMs = nowMs - days * 24 * 3600_000;
  const records: TransitionRecord[] = transitionsSince(db, fromMs).map((e) => ({
    alarmKey: `${e.siteId}/${e.key}`,
    ruleId: e.ruleId,
    equipment: e.equipment,
    priority: e.priority as Priority,
    from: e.from as TransitionRecord["from"],
    to: e.to as TransitionRecord["to"],
    cause: e.cause as TransitionRecord["cause"],
    atMs: e.atMs,
    actor: e.actorUserId ? { kind: "person", id: e.actorUserId } : { kind: "system" },
    note: e.note,
    conditionActive: e.cause === "condition_active",
  }));
  // One person carries the pager at a time: the rate is per that person.
  return computeAlarmHealth({ records, alarms: allAlarmMachines(db), fromMs, toMs: nowMs, onCallPeople: 1 });
}
