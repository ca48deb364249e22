import "server-only";
import { and, eq, gte, inArray } from "drizzle-orm";
import type { Db } from "../client";
import { alarmEvents, alarms, equipment, latestValues, points, readings, readings1m } from "../schema";
import { newAlarm, type Alarm } from "@/lib/alarms";

/**
 * Removes a demo site's readings from `fromMs` on and returns its alarms to normal, recorded in
 * each alarm's history, so a simulated run that starts in the past does not interleave with the
 * one before. `rebuildHour` recomputes a point's hourly rollups from its minutes (the ingest
 * side owns that arithmetic). Returns the site's point ids.
 */
export function resetSiteTimeline(
  db: Db,
  siteId: string,
  fromMs: number,
  nowMs: number,
  rebuildHour: (pointId: number, fromMs: number) => void,
): number[] {
  const pointIds = db
    .select({ id: points.id })
    .from(points)
    .innerJoin(equipment, eq(equipment.id, points.equipmentId))
    .where(eq(equipment.siteId, siteId))
    .all()
    .map((p) => p.id);
  db.transaction(
    (tx) => {
      if (pointIds.length) {
        tx.delete(readings)
          .where(and(inArray(readings.pointId, pointIds), gte(readings.ts, fromMs)))
          .run();
        tx.delete(readings1m)
          .where(and(inArray(readings1m.pointId, pointIds), gte(readings1m.bucket, fromMs - 60_000)))
          .run();
        for (const id of pointIds) rebuildHour(id, fromMs - 60_000);
        tx.delete(latestValues).where(inArray(latestValues.pointId, pointIds)).run();
      }
      for (const row of tx.select().from(alarms).where(eq(alarms.siteId, siteId)).all()) {
        const machine = JSON.parse(row.machineJson) as Alarm;
        const fresh = newAlarm({
          ruleId: machine.ruleId,
          equipment: machine.equipment,
          priority: machine.priority,
          latching: machine.latching,
        });
        if (row.state !== "normal") {
          tx.insert(alarmEvents)
            .values({
              alarmId: row.id,
              siteId,
              fromState: row.state,
              toState: "normal",
              cause: "simulation_restarted",
              priority: row.priority,
              eventAtMs: fromMs,
              note: "A new simulated scenario replaced this site's timeline",
            })
            .run();
        }
        tx.update(alarms)
          .set({ state: "normal", conditionActive: false, machineJson: JSON.stringify(fresh), updatedAt: nowMs })
          .where(eq(alarms.id, row.id))
          .run();
      }
    },
    { behavior: "immediate" },
  );
  return pointIds;
}
