// Loss of water flow through a chiller's barrel while its pump is proven: a clogging strainer, a
// part-shut isolation valve or an air-bound barrel. The pump's own failure is `pump_not_proven`;
// this one reads the barrel itself — its flow meter against design flow, else its water pressure
// drop against the drop at design flow, where ΔP goes with the square of the flow (turbulent flow
// in the tubes, Darcy–Weisbach; recalled), so a quarter of the design drop is half the flow.

import type { Equipment } from "@/lib/plant/site";
import type { QuantityKey } from "@/lib/quantities";
import type { Condition } from "./condition";
import { bool, chillersOf, num, type RuleContext } from "./context";
import { fmtPressure } from "./format";
import { makeCondition } from "./make-condition";
import { pumpFailedToProve } from "./pump-proof";

type Loop = "chilled_water" | "condenser_water";

interface Barrel {
  loop: Loop;
  name: string;
  flow: QuantityKey;
  dp: QuantityKey;
  designFlowLps: number | undefined;
  designDpKPa: number | undefined;
}

const barrelsOf = (chiller: Equipment): Barrel[] => [
  {
    loop: "chilled_water",
    name: "evaporator",
    flow: "chilled_water_flow",
    dp: "evaporator_water_dp",
    designFlowLps: chiller.designFlowLps,
    designDpKPa: chiller.evapDesignDpKPa,
  },
  {
    loop: "condenser_water",
    name: "condenser",
    flow: "condenser_water_flow",
    dp: "condenser_water_dp",
    designFlowLps: chiller.cwDesignFlowLps,
    designDpKPa: chiller.condDesignDpKPa,
  },
];

/** The barrel's flow as a share of design: metered if the site has a meter, else from its ΔP; null when neither can say. */
function flowShare(ctx: RuleContext, chiller: Equipment, b: Barrel): { share: number; dpKPa: number | null } | null {
  const dpKPa = num(ctx, chiller.tag, b.dp);
  const flowLps = num(ctx, chiller.tag, b.flow);
  if (flowLps !== null && b.designFlowLps) return { share: Math.max(0, flowLps) / b.designFlowLps, dpKPa };
  if (dpKPa !== null && b.designDpKPa) return { share: Math.sqrt(Math.max(0, dpKPa) / b.designDpKPa), dpKPa };
  return null;
}

export function barrelFlowLost(ctx: RuleContext): Condition[] {
  const s = ctx.settings.barrelFlow;
  if (!s.enabled) return [];
  return chillersOf(ctx.site).flatMap((chiller) => {
    const running = bool(ctx, chiller.tag, "run_status") === true;
    const pumps = (loop: Loop) =>
      ctx.site.filter((e) => e.kind === "pump" && e.serves === chiller.tag && (e.loop ?? loop) === loop);
    const numbers: Record<string, number | null> = {};
    const low: string[] = [];
    let measured = false;
    for (const b of barrelsOf(chiller)) {
      const share = flowShare(ctx, chiller, b);
      if (!share) continue;
      measured = true;
      numbers[`${b.name}FlowShare`] = share.share;
      numbers[`${b.name}WaterDpKPa`] = share.dpKPa;
      if (b.designDpKPa) numbers[`${b.name}DesignDpKPa`] = b.designDpKPa;
      const served = pumps(b.loop);
      // Flow is due while the compressor runs, or while a pump serving this barrel is commanded on.
      const due = running || served.some((p) => bool(ctx, p.tag, "pump_run_command") === true);
      // A pump commanded on and not proven already has its own alarm; the barrel follows from it.
      const pumpFailed = served.some((p) => pumpFailedToProve(ctx, p.tag));
      const limit = s.minFlowShare + (ctx.wasActive("barrel_flow_lost", chiller.tag) ? s.deadBandShare : 0);
      if (due && !pumpFailed && share.share < limit)
        low.push(
          `${b.name} flow about ${Math.round(share.share * 100)} % of design` +
            (share.dpKPa !== null && b.designDpKPa
              ? ` (water ΔP ${fmtPressure(share.dpKPa, true)} against ${fmtPressure(b.designDpKPa, true)} at design)`
              : ""),
        );
    }
    if (!measured) return [];
    const active = low.length > 0;
    return [
      makeCondition({
        ruleId: "barrel_flow_lost",
        equipment: chiller.tag,
        active,
        priority: s.priority,
        atMs: ctx.nowMs,
        technicianMessage: active
          ? `${chiller.tag}: ${low.join("; ")} while its pump runs proven${running ? " and the compressor runs" : ""}.`
          : `${chiller.tag}: water flow through its barrels as expected.`,
        ownerMessage: active
          ? "Less water is flowing through a chiller than it needs; it may shut itself off."
          : "Water is flowing through the chillers as expected.",
        advice: active
          ? [
              "Check the strainer ahead of the barrel and its differential: a clogged basket is the usual cause.",
              "Walk the barrel's valves: an isolation or balancing valve left part-shut after work, or an automatic isolation valve not fully open.",
              "Vent the barrel's high points if air may be trapped, and check the pump's suction and discharge pressures against its curve.",
              "With low condenser flow the head pressure climbs; with low chilled-water flow the evaporator can freeze — unload or stop the chiller rather than let its safeties do it.",
            ]
          : [],
        caution: active
          ? "Clean strainers and work on valves only with the chiller stopped and the section isolated and locked out, following the manufacturer's procedures and local codes."
          : null,
        numbers: { ...numbers, running: Number(running) },
      }),
    ];
  });
}
