import type { Db } from "@/db/client";
import { pointRuleNameLookup, pointRuleNames } from "@/db/queries/readings";
import type { CommittedRows } from "@/gateway/row-columns";
import type { Reading } from "@/lib/plant/site";
import { isQuantityKey, type QuantityKey } from "@/lib/quantities";
import type { AlarmService } from "./service";

/**
 * Longest stretch of rule checks between two turns of the event loop: a page request waits a
 * turn at each of its awaits, so long turns add up (tests/bench/PERFORMANCE.md).
 */
const SLICE_MS = 3;

/**
 * Turns committed readings into the rule engine's readings (equipment tag + quantity) and
 * hands them to the alarm service per site. Bad-quality readings are kept out of the rules.
 */
export function createRuleFeed(deps: { db: Db; service: AlarmService }): (rows: CommittedRows) => void {
  const byPoint = new Map<number, { tag: string; quantity: QuantityKey } | null>();
  const remember = (pointId: number, row: { tag: string; quantity: string } | undefined) => {
    const p = row && isQuantityKey(row.quantity) ? { tag: row.tag, quantity: row.quantity } : null;
    byPoint.set(pointId, p);
    return p;
  };
  // One query for every point up front, not one per new point on the event loop.
  let loaded = false;
  const loadAll = () => {
    loaded = true;
    for (const r of pointRuleNames(deps.db)) remember(r.pointId, r);
  };
  // Points created later (a new point map) are looked up one by one, with a statement prepared once.
  const one = pointRuleNameLookup(deps.db);
  const lookUp = (pointId: number) => {
    const hit = byPoint.get(pointId);
    if (hit !== undefined) return hit;
    if (!loaded) {
      loadAll();
      const again = byPoint.get(pointId);
      if (again !== undefined) return again;
    }
    return remember(pointId, one(pointId));
  };

  const guarded = (siteId: string, work: () => void) => {
    try {
      work();
    } catch (err) {
      // A rule failure must never stop ingestion; it is logged and the next batch tries again.
      console.error(`[rules] ${siteId}: ${err instanceof Error ? err.stack : err}`);
    }
  };

  // Readings go into each site's history as they commit (typed arrays); the rule checks run off
  // the commit path, a few sites per turn of the event loop, since every site's evaluation falls
  // due in the same flush and running them all there would hold PUBACKs, pushes and pages. Only
  // site ids wait, not readings, so nothing queued outlives a young-generation collection.
  const due = new Set<string>();
  let scheduled = false;
  const drain = () => {
    scheduled = false;
    const until = performance.now() + SLICE_MS;
    for (const siteId of due) {
      due.delete(siteId);
      // A backfill's many evaluations run a bounded batch per turn; the site waits again for the rest.
      guarded(siteId, () => deps.service.evaluateDue(siteId) && due.add(siteId));
      if (performance.now() >= until) break;
    }
    if (due.size > 0) schedule();
  };
  const schedule = () => {
    if (scheduled) return;
    scheduled = true;
    setImmediate(drain);
  };

  // Reading objects are reused from one flush to the next (record() keeps none of them), so the
  // hot path makes no object per committed reading.
  const pool: Reading[] = [];
  let used = 0;
  const reading = (tsMs: number, equipment: string, quantity: QuantityKey, value: Reading["value"]): Reading => {
    let r = pool[used];
    if (r) {
      r.tsMs = tsMs;
      r.equipment = equipment;
      r.quantity = quantity;
      r.value = value;
    } else pool.push((r = { tsMs, equipment, quantity, value }));
    used++;
    return r;
  };
  const bySite = new Map<string, Reading[]>();
  return (rows) => {
    let lastSite: string | undefined;
    let list: Reading[] | undefined;
    used = 0;
    for (let i = 0; i < rows.length; i++) {
      if (rows.quality(i) >= 2) continue;
      const p = lookUp(rows.pointId(i));
      if (!p) continue;
      // Rows of one message share a site; skip the map lookup while it does not change.
      const siteId = rows.siteId(i);
      if (siteId !== lastSite || !list) {
        lastSite = siteId;
        list = bySite.get(siteId);
        if (!list) bySite.set(siteId, (list = []));
      }
      list.push(reading(rows.ts(i), p.tag, p.quantity, rows.live(i)));
    }
    for (const [siteId, readings] of bySite)
      guarded(siteId, () => deps.service.record(siteId, readings) && due.add(siteId));
    bySite.clear();
    if (due.size > 0) schedule();
  };
}
