import type { Db } from "@/db/client";
import { alarmSummaryBySite } from "@/db/queries/alarms";
import { canAct, type Viewer } from "@/lib/auth/viewer";
import type { SiteStatus } from "@/lib/realtime/events";
import { getRuntime } from "../runtime";

/** Each visible site's board status: data freshness, worst active alarm, unacknowledged count. */
export function siteStatuses(db: Db, viewer: Viewer, siteIds: readonly string[]): Map<string, SiteStatus> {
  const alarms = alarmSummaryBySite(db, viewer);
  const dataStatus = getRuntime()?.siteDataStatus;
  const staff = canAct(viewer);
  const out = new Map<string, SiteStatus>();
  for (const siteId of siteIds) {
    const a = alarms.get(siteId);
    const worst = a?.worst;
    out.set(siteId, {
      siteId,
      data: dataStatus ? dataStatus(siteId) : "no_gateway",
      worst: worst
        ? { priority: worst.priority, ruleId: worst.ruleId, equipment: worst.equipment, title: staff ? worst.detail.technicianMessage : worst.detail.ownerMessage || worst.detail.technicianMessage, active: worst.conditionActive }
        : null,
      unacknowledged: a?.unacknowledged ?? 0,
    });
  }
  return out;
}
