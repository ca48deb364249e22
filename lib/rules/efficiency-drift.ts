// Rule 10: efficiency or approach drift against the equipment's own baseline (maintenance).
// kW/ton is averaged as Σ kW ÷ Σ tons over the window — energy over cooling, not a mean of
// ratios (the same reason AHRI 550/590 forbids averaging kW/ton directly, REFERENCES.md §3).
// Rising condenser approach at steady load is the usual sign of tube fouling (common practice).

import type { Equipment } from "@/lib/plant/site";
import { chillerSnapshot } from "@/lib/plant/snapshot";
import type { HistoryView } from "./history";
import type { Condition } from "./condition";
import { chillersOf, type RuleContext } from "./context";
import { fmtDelta } from "./format";
import { makeCondition } from "./make-condition";
import type { Site } from "@/lib/plant/site";

export interface AveragedEfficiency {
  kwPerTon: number | null;
  condenserApproachK: number | null;
  /** Share of the window's samples that were running at a comparable load. */
  coverage: number;
}

/** Averages over [fromMs, toMs] at loads ≥ minLoadFraction; also how a server learns a baseline. */
export function averagedEfficiency(args: {
  site: Site;
  history: HistoryView;
  chiller: Equipment;
  fromMs: number;
  toMs: number;
  stepS: number;
  minLoadFraction: number;
}): AveragedEfficiency {
  let kw = 0;
  let tons = 0;
  let approachSum = 0;
  let approachN = 0;
  let total = 0;
  let used = 0;
  for (let t = args.fromMs; t <= args.toMs; t += args.stepS * 1000) {
    total++;
    const s = chillerSnapshot(args.site, args.history.latestValuesAt(t), args.chiller, t);
    if (!s.running || s.loadFraction === null || s.loadFraction < args.minLoadFraction) continue;
    if (s.compressorPowerKw === null || s.loadTons === null) continue;
    used++;
    kw += s.compressorPowerKw;
    tons += s.loadTons;
    if (s.condenserApproachK !== null) {
      approachSum += s.condenserApproachK;
      approachN++;
    }
  }
  return {
    kwPerTon: tons > 0 ? kw / tons : null,
    condenserApproachK: approachN ? approachSum / approachN : null,
    coverage: total ? used / total : 0,
  };
}

export function efficiencyDrift(ctx: RuleContext): Condition[] {
  const s = ctx.settings.efficiencyDrift;
  if (!s.enabled) return [];
  return chillersOf(ctx.site).flatMap((chiller) => {
    const baseline = s.baselines[chiller.tag];
    if (!baseline) return [];
    const avg = averagedEfficiency({
      site: ctx.site,
      history: ctx.history,
      chiller,
      fromMs: ctx.nowMs - s.averagingWindowS * 1000,
      toMs: ctx.nowMs,
      stepS: s.sampleStepS,
      minLoadFraction: s.minLoadFraction,
    });
    const enough = avg.coverage >= s.minCoverage;
    const kwDrift =
      baseline.kwPerTon !== undefined && avg.kwPerTon !== null ? avg.kwPerTon / baseline.kwPerTon - 1 : null;
    const approachDrift =
      baseline.condenserApproachK !== undefined && avg.condenserApproachK !== null
        ? avg.condenserApproachK - baseline.condenserApproachK
        : null;
    const kwHigh = kwDrift !== null && kwDrift > s.kwPerTonDriftFraction;
    const approachHigh = approachDrift !== null && approachDrift > s.approachDriftK;
    const active = enough && (kwHigh || approachHigh);
    const parts = [
      kwHigh
        ? `kW/ton ${avg.kwPerTon!.toFixed(3)} is ${(kwDrift! * 100).toFixed(0)} % above its baseline ${baseline.kwPerTon!.toFixed(3)}`
        : null,
      approachHigh
        ? `condenser approach ${fmtDelta(avg.condenserApproachK!)} is ${fmtDelta(approachDrift!)} above its baseline`
        : null,
    ].filter((p): p is string => p !== null);
    return [
      makeCondition({
        ruleId: "efficiency_drift",
        equipment: chiller.tag,
        active,
        priority: s.priority,
        atMs: ctx.nowMs,
        technicianMessage: active
          ? `${chiller.tag}: ${parts.join("; ")} (averaged over ${(s.averagingWindowS / 60).toFixed(0)} min at comparable load).`
          : `${chiller.tag}: efficiency in line with its baseline.`,
        ownerMessage: active
          ? "A chiller is using more energy than it used to for the same cooling; maintenance is recommended."
          : "Chiller efficiency is in line with its usual performance.",
        advice: active
          ? [
              "Plan condenser tube inspection/cleaning and check water treatment.",
              "Check refrigerant charge and non-condensables at the next visit.",
            ]
          : [],
        numbers: {
          kwPerTon: avg.kwPerTon,
          baselineKwPerTon: baseline.kwPerTon ?? null,
          condenserApproachK: avg.condenserApproachK,
          baselineCondenserApproachK: baseline.condenserApproachK ?? null,
          coverage: avg.coverage,
        },
      }),
    ];
  });
}
