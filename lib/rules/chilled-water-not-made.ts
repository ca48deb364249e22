// "It's warm in here": the plant is called and a chiller's leaving chilled water stays above its
// setpoint by a margin. A chiller's own latched trip already has its alarm, so this one speaks for
// the cases nothing else names — a chiller running short of capacity, or nothing running at all.

import type { Condition } from "./condition";
import { bool, chillerCalledFor, chillersOf, num, type RuleContext } from "./context";
import { fmtDelta, fmtTemp } from "./format";
import { lastEdgeMs } from "./history";
import { makeCondition } from "./make-condition";

export function chilledWaterNotMade(ctx: RuleContext): Condition[] {
  const s = ctx.settings.chilledWaterNotMade;
  if (!s.enabled) return [];
  return chillersOf(ctx.site).flatMap((chiller) => {
    const leavingC = num(ctx, chiller.tag, "chilled_water_leaving_temp");
    if (leavingC === null) return [];
    const setpointC = num(ctx, chiller.tag, "chilled_water_leaving_temp_setpoint") ?? s.defaultSetpointC;
    const called = chillerCalledFor(ctx, chiller);
    const tripped = bool(ctx, chiller.tag, "chiller_alarm") === true;
    const running = bool(ctx, chiller.tag, "run_status") === true;
    const startMs = lastEdgeMs(ctx.history.edges(chiller.tag, "run_status", ctx.nowMs).rises);
    // A chiller pulling a warm loop down after a start is doing its job, not failing at it.
    const pullingDown = running && startMs !== null && ctx.nowMs - startMs < s.pullDownS * 1000;
    // Stopped and held by its anti-recycle timer, it restarts by itself when the timer lets it (a
    // low-load cycle); a trip holding it has its own alarm.
    const waitingOnTimer = !running && (num(ctx, chiller.tag, "restart_inhibit_time_left") ?? 0) > 0;
    // A stopped lag chiller reads the still water in its own barrel: while another chiller runs, the
    // plant's water is judged at the running ones.
    const anotherRuns = chillersOf(ctx.site).some(
      (c) => c.tag !== chiller.tag && bool(ctx, c.tag, "run_status") === true,
    );
    const overK = leavingC - setpointC;
    const margin = s.marginK - (ctx.wasActive("chilled_water_not_made", chiller.tag) ? s.deadBandK : 0);
    const active = called && !tripped && !pullingDown && !waitingOnTimer && (running || !anotherRuns) && overK > margin;
    return [
      makeCondition({
        ruleId: "chilled_water_not_made",
        equipment: chiller.tag,
        active,
        priority: s.priority,
        atMs: ctx.nowMs,
        technicianMessage: active
          ? `${chiller.tag}: chilled water leaving ${fmtTemp(leavingC)}, ${fmtDelta(overK)} above its setpoint ${fmtTemp(setpointC)} while the plant is called${running ? " and the chiller runs" : " and the chiller is not running"}.`
          : `${chiller.tag}: chilled water leaving ${fmtTemp(leavingC)} (setpoint ${fmtTemp(setpointC)}).`,
        ownerMessage: active
          ? "The plant is not making water cold enough: rooms may get warm."
          : "Chilled water is at its setpoint.",
        advice: active
          ? running
            ? [
                "Running but short of capacity: check the demand limit and current limit, condenser water temperature and head pressure, and whether the load is beyond one chiller (stage another).",
                "Check the chilled-water flow: too much flow through one chiller lowers its temperature difference and its leaving temperature rises.",
              ]
            : [
                "Called but not running: find what holds it — its enable, a flow switch, an anti-recycle timer, a safety that needs a manual reset.",
              ]
          : [],
        caution: active
          ? "Change limits and setpoints only within the manufacturer's limits, and restore them when the cause is fixed."
          : null,
        numbers: { leavingC, setpointC, aboveSetpointK: overK, running: Number(running) },
      }),
    ];
  });
}
