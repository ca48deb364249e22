import { eq } from "drizzle-orm";
import type { Db } from "@/db/client";
import { equipment, points } from "@/db/schema";
import type { Reading } from "@/lib/plant/site";
import { isQuantityKey, type QuantityKey } from "@/lib/quantities";
import type { AlarmService } from "./service";

/** A committed reading as ingestion reports it: canonical value, event time. */
export interface CommittedReading {
  pointId: number;
  siteId: string;
  ts: number;
  live: number | boolean | string;
  /** 0 good, 1 uncertain, 2 bad. */
  quality: number;
}

/**
 * Turns committed readings into the rule engine's readings (equipment tag + quantity) and
 * hands them to the alarm service per site. Bad-quality readings are kept out of the rules.
 */
export function createRuleFeed(deps: { db: Db; service: AlarmService }): (rows: readonly CommittedReading[]) => void {
  const byPoint = new Map<number, { tag: string; quantity: QuantityKey } | null>();
  const lookUp = (pointId: number) => {
    if (!byPoint.has(pointId)) {
      const row = deps.db
        .select({ tag: equipment.tag, quantity: points.quantity })
        .from(points)
        .innerJoin(equipment, eq(equipment.id, points.equipmentId))
        .where(eq(points.id, pointId))
        .get();
      byPoint.set(pointId, row && isQuantityKey(row.quantity) ? { tag: row.tag, quantity: row.quantity } : null);
    }
    return byPoint.get(pointId)!;
  };
  return (rows) => {
    const perSite = new Map<string, Reading[]>();
    for (const r of rows) {
      if (r.quality >= 2) continue;
      const p = lookUp(r.pointId);
      if (!p) continue;
      const list = perSite.get(r.siteId) ?? [];
      list.push({ tsMs: r.ts, equipment: p.tag, quantity: p.quantity, value: r.live });
      perSite.set(r.siteId, list);
    }
    for (const [siteId, readings] of perSite) {
      try {
        deps.service.ingest(siteId, readings);
      } catch (err) {
        // A rule failure must never stop ingestion; it is logged and the next batch tries again.
        console.error(`[rules] ${siteId}: ${err instanceof Error ? err.stack : err}`);
      }
    }
  };
}
