import type { Db } from "@/db/client";
import { alarmSummaryBySite } from "@/db/queries/alarms";
import type { AlarmDto } from "@/lib/dto/alarms";
import type { Viewer } from "@/lib/auth/viewer";
import type { SiteStatus } from "@/lib/realtime/events";
import { renderDetailWords } from "@/lib/quantity-text";
import type { UnitSystem } from "@/lib/units";
import { getRuntime } from "../runtime";

type AlarmSide = Pick<SiteStatus, "worst" | "unacknowledged">;

/** `words`: the reader's units, or "tokens" for a push to many readers (each browser renders them). */
function toWorst(worst: AlarmDto | null | undefined, words: UnitSystem | "tokens"): SiteStatus["worst"] {
  if (!worst) return null;
  const d = words === "tokens" ? worst.detail : renderDetailWords(worst.detail, words);
  return {
    priority: worst.priority,
    ruleId: worst.ruleId,
    equipment: worst.equipment,
    title: d.technicianMessage,
    ownerTitle: d.ownerMessage || d.technicianMessage,
    active: worst.conditionActive,
  };
}

/** The alarm half of a site's board status (worst active alarm, unacknowledged count). */
function alarmSide(
  summary: Map<string, { worst: AlarmDto | null; unacknowledged: number }>,
  siteId: string,
  words: UnitSystem | "tokens",
): AlarmSide {
  const a = summary.get(siteId);
  return { worst: toWorst(a?.worst, words), unacknowledged: a?.unacknowledged ?? 0 };
}

/**
 * The alarm side of every site's status push, read with the service company's full view: one
 * summary query serves a whole status round, and an alarm change makes the next one fresh.
 */
export function createBoardAlarmSummary(
  db: Db,
  viewer: Viewer,
  clock: () => number = Date.now,
): { side(siteId: string): AlarmSide; invalidate(): void } {
  let atMs = -Infinity;
  let bySite = new Map<string, { worst: AlarmDto | null; unacknowledged: number }>();
  return {
    side(siteId) {
      if (clock() - atMs > 1000) {
        atMs = clock();
        bySite = alarmSummaryBySite(db, viewer);
      }
      return alarmSide(bySite, siteId, "tokens");
    },
    invalidate() {
      atMs = -Infinity;
    },
  };
}

/** Each visible site's board status: data freshness, worst active alarm, unacknowledged count. */
export function boardStatuses(db: Db, viewer: Viewer, siteIds: readonly string[]): Map<string, SiteStatus> {
  const summary = alarmSummaryBySite(db, viewer);
  const dataStatus = getRuntime()?.siteDataStatus;
  const out = new Map<string, SiteStatus>();
  for (const siteId of siteIds)
    out.set(siteId, {
      siteId,
      data: dataStatus ? dataStatus(siteId) : "no_gateway",
      ...alarmSide(summary, siteId, viewer.unitSystem),
    });
  return out;
}
