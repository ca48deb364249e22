// Rule 9: communication lost — the gateway is offline or an equipment's points are stale.
// The server supplies what only it knows (gateway connected, or its own staleness verdict);
// otherwise staleness is judged from event time: no reading for staleAfterS.

import { SITE_TAG, type Condition } from "./condition";
import type { RuleContext } from "./context";
import { formatDuration } from "@/lib/units";
import { makeCondition } from "./make-condition";

export function commLost(ctx: RuleContext): Condition[] {
  const s = ctx.settings.commLost;
  if (!s.enabled) return [];
  const out: Condition[] = [];
  const offline = ctx.comms.gatewayOnline === false;
  out.push(
    makeCondition({
      ruleId: "comm_lost",
      equipment: SITE_TAG,
      active: offline,
      priority: s.priority,
      atMs: ctx.nowMs,
      technicianMessage: offline
        ? "Site gateway offline: no live data; warnings cannot fire until it reconnects."
        : "Site gateway connected.",
      ownerMessage: offline
        ? "We have lost contact with your plant's monitoring link; we cannot see its status right now."
        : "Monitoring link connected.",
      advice: offline ? ["Check the gateway's power and network at the site, or call someone on site."] : [],
    }),
  );
  for (const e of ctx.site) {
    const lastMs = ctx.history.lastSeenAt(e.tag, ctx.nowMs);
    // Equipment not heard from yet is timed from the site's first reading: just after a start
    // a gateway has not sent every point, and that is not a lost link.
    const sinceMs = lastMs ?? ctx.history.firstSeenAt();
    const ageS = sinceMs === null ? null : (ctx.nowMs - sinceMs) / 1000;
    const stale = ctx.comms.staleEquipment
      ? ctx.comms.staleEquipment.includes(e.tag)
      : ageS === null || ageS > s.staleAfterS;
    // A gateway that is offline already says it; per-equipment staleness would only repeat it.
    const active = stale && !offline;
    out.push(
      makeCondition({
        ruleId: "comm_lost",
        equipment: e.tag,
        active,
        priority: s.priority,
        atMs: ctx.nowMs,
        technicianMessage: active
          ? `${e.tag}: no readings ${ageS === null ? "received" : `for ${formatDuration(ageS)}`}; its values and warnings are out of date.`
          : `${e.tag}: reporting.`,
        ownerMessage: active ? `We are not receiving data from ${e.tag}.` : `${e.tag} is reporting.`,
        advice: active ? ["Check the controller's connection to the gateway."] : [],
        numbers: { lastReadingMs: lastMs, ageS },
      }),
    );
  }
  return out;
}
