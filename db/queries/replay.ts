import "server-only";
import { and, asc, eq, gte, lte, lt } from "drizzle-orm";
import type { Db } from "../client";
import { alarmEvents, alarms, equipment, points, readings } from "../schema";
import { canSeeSite } from "./sites";
import type { Viewer } from "@/lib/auth/viewer";
import { notFound } from "@/lib/errors";
import { isQuantityKey, quantities, type QuantityKey } from "@/lib/quantities";
import type { ReplayPointDto, ReplayTransitionDto } from "@/lib/dto/replay";

// A window of a site's stored history for replay: the raw readings the rules and the plant
// numbers read (good and uncertain quality, as the rule feed takes them) and the recorded alarm
// transitions. Viewer-scoped: a site the viewer may not see is 404.

function requireSite(db: Db, viewer: Viewer, siteId: string) {
  if (!canSeeSite(db, viewer, siteId)) throw notFound("No such site.");
}

/** Per point, its readings with fromMs ≤ ts ≤ toMs in time order (booleans as booleans, states as text). */
export function replayReadings(db: Db, viewer: Viewer, siteId: string, fromMs: number, toMs: number): ReplayPointDto[] {
  requireSite(db, viewer, siteId);
  const rows = db
    .select({
      pointId: readings.pointId,
      tag: equipment.tag,
      quantity: points.quantity,
      ts: readings.ts,
      value: readings.value,
      text: readings.text,
    })
    .from(readings)
    .innerJoin(points, eq(points.id, readings.pointId))
    .innerJoin(equipment, eq(equipment.id, points.equipmentId))
    // Bad quality never reaches the rules (lib/server/alarms/feed.ts), so it is left out here too.
    .where(and(eq(equipment.siteId, siteId), gte(readings.ts, fromMs), lte(readings.ts, toMs), lt(readings.quality, 2)))
    .orderBy(asc(readings.pointId), asc(readings.ts))
    .all();
  const out: ReplayPointDto[] = [];
  let cur: ReplayPointDto | undefined;
  for (const r of rows) {
    if (!isQuantityKey(r.quantity)) continue;
    if (!cur || cur.pointId !== r.pointId) {
      cur = { pointId: r.pointId, equipment: r.tag, quantity: r.quantity as QuantityKey, tsMs: [], values: [] };
      out.push(cur);
    }
    const measure = quantities[r.quantity as QuantityKey].measure;
    const value =
      measure === "boolean"
        ? r.value === null
          ? null
          : r.value !== 0
        : measure === "state" || measure === "text"
          ? r.text
          : r.value;
    if (value === null) continue;
    cur.tsMs.push(r.ts);
    cur.values.push(value);
  }
  return out;
}

/** The alarm transitions recorded with fromMs ≤ event time ≤ toMs, in the order they were stored. */
export function recordedTransitions(
  db: Db,
  viewer: Viewer,
  siteId: string,
  fromMs: number,
  toMs: number,
): ReplayTransitionDto[] {
  requireSite(db, viewer, siteId);
  return db
    .select({
      alarmKey: alarms.key,
      ruleId: alarms.ruleId,
      equipment: alarms.equipment,
      priority: alarmEvents.priority,
      from: alarmEvents.fromState,
      to: alarmEvents.toState,
      cause: alarmEvents.cause,
      atMs: alarmEvents.eventAtMs,
      wallAtMs: alarmEvents.wallAtMs,
    })
    .from(alarmEvents)
    .innerJoin(alarms, eq(alarms.id, alarmEvents.alarmId))
    .where(and(eq(alarmEvents.siteId, siteId), gte(alarmEvents.eventAtMs, fromMs), lte(alarmEvents.eventAtMs, toMs)))
    .orderBy(asc(alarmEvents.id))
    .all();
}

/** Per alarm, its last transition before `fromMs` when that left it out of normal: the alarms as they stood at the window's start. */
export function transitionsStandingAt(db: Db, viewer: Viewer, siteId: string, fromMs: number): ReplayTransitionDto[] {
  requireSite(db, viewer, siteId);
  return db.$client
    .prepare(
      `select a.key as alarmKey, a.rule_id as ruleId, a.equipment, e.priority, e.from_state as "from",
              e.to_state as "to", e.cause, e.event_at_ms as atMs, e.wall_at_ms as wallAtMs
         from alarm_events e join alarms a on a.id = e.alarm_id
        where e.id in (select max(id) from alarm_events where site_id = ? and event_at_ms < ? group by alarm_id)
          and e.to_state <> 'normal'
        order by e.event_at_ms`,
    )
    .all(siteId, fromMs) as ReplayTransitionDto[];
}

/**
 * Changes to what the rules read (rule settings, equipment, limits) recorded at or after `sinceMs`
 * (wall clock): a replay runs with today's, so a window before such a change may replay differently.
 */
export function ruleInputChangesSince(
  db: Db,
  viewer: Viewer,
  siteId: string,
  sinceMs: number,
): Array<{ atMs: number; entityType: string; summary: string }> {
  requireSite(db, viewer, siteId);
  return db.$client
    .prepare(
      `select at as atMs, entity_type as entityType, summary from audit_log
        where site_id = ? and at >= ? and entity_type in ('rule_settings', 'equipment', 'limit')
        order by at`,
    )
    .all(siteId, sinceMs) as Array<{ atMs: number; entityType: string; summary: string }>;
}
