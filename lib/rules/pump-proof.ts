// Loss of water flow at its source: a pump commanded on whose run is not proven (status off or the
// drive faulted). A chiller without condenser flow trips on high pressure; without chilled-water flow
// its evaporator can freeze — the flow-proof delay is already in the on-delay.

import type { Condition } from "./condition";
import { bool, type RuleContext } from "./context";
import { makeCondition } from "./make-condition";

/** Commanded on and not proven: its run status is off or its drive faulted (false without a command point). */
export function pumpFailedToProve(ctx: RuleContext, tag: string): boolean {
  if (bool(ctx, tag, "pump_run_command") !== true) return false;
  return bool(ctx, tag, "pump_fault") === true || bool(ctx, tag, "pump_status") === false;
}

export function pumpNotProven(ctx: RuleContext): Condition[] {
  const s = ctx.settings.pumpProof;
  if (!s.enabled) return [];
  return ctx.site
    .filter((e) => e.kind === "pump")
    .flatMap((pump) => {
      const commanded = bool(ctx, pump.tag, "pump_run_command");
      // Without a command point nothing says the pump should run: its status alone is not a fault.
      if (commanded === null) return [];
      const status = bool(ctx, pump.tag, "pump_status");
      const faulted = bool(ctx, pump.tag, "pump_fault") === true;
      const active = pumpFailedToProve(ctx, pump.tag);
      const served = pump.serves ? ` (serves ${pump.serves})` : "";
      const why = faulted ? "its drive reports a fault" : "its run status is not proven";
      return [
        makeCondition({
          ruleId: "pump_not_proven",
          equipment: pump.tag,
          active,
          priority: s.priority,
          atMs: ctx.nowMs,
          technicianMessage: active
            ? `${pump.tag}${served}: commanded on but ${why} — no proven flow; the chiller it serves will trip on its flow switch.`
            : `${pump.tag}: ${commanded ? "running as commanded" : "off as commanded"}.`,
          ownerMessage: active
            ? "A pump that should be running is not, so water is not flowing through a chiller."
            : "Pumps are running as commanded.",
          advice: active
            ? [
                "Check the pump's drive or starter for a fault and its disconnect, and find the cause before a reset.",
                "Where there is a standby pump, bring it on — a chiller without flow must not run.",
              ]
            : [],
          caution: active
            ? "Work on pumps and drives only under lockout/tagout by qualified people, following the manufacturer's procedures and local codes."
            : null,
          numbers: {
            commanded: Number(commanded),
            proven: status === null ? null : Number(status),
            faulted: Number(faulted),
          },
        }),
      ];
    });
}
