import type { Db } from "@/db/client";
import { recordedTransitions, replayReadings, ruleInputChangesSince, transitionsStandingAt } from "@/db/queries/replay";
import { siteEquipment, siteTimeZone } from "@/db/queries/sites";
import type { Viewer } from "@/lib/auth/viewer";
import type { ReplayPointDto, ReplayTransitionDto, ReplayWindowDto } from "@/lib/dto/replay";
import type { Reading } from "@/lib/plant/site";
import { createSiteMonitor } from "@/lib/rules";
import { diffTransitions, replayRules, type RuleReplay } from "@/lib/rules/replay";
import { loadRuleSettings } from "./alarms/service";

// Replay of a site's stored history: the window a replay page plays back, and the rules re-run
// over it to check they give the transitions that were recorded.

/** A window of a site for the replay page (the route checks its bounds). */
export function loadReplayWindow(
  db: Db,
  viewer: Viewer,
  siteId: string,
  fromMs: number,
  toMs: number,
): ReplayWindowDto {
  // Each query checks the viewer may see the site (404 otherwise) before anything is read.
  const points = replayReadings(db, viewer, siteId, fromMs, toMs);
  return {
    siteId,
    timeZone: siteTimeZone(db, siteId) ?? null,
    fromMs,
    toMs,
    equipment: [...siteEquipment(db, siteId)],
    points,
    transitions: recordedTransitions(db, viewer, siteId, fromMs, toMs),
    activeAtStart: transitionsStandingAt(db, viewer, siteId, fromMs),
    crossoverRisk: loadRuleSettings(db, siteId).crossoverRisk,
  };
}

/** Columns back to the rules' readings, merged in event time. */
export function readingsOf(points: readonly ReplayPointDto[]): Reading[] {
  const out: Reading[] = [];
  for (const p of points)
    for (let i = 0; i < p.tsMs.length; i++)
      out.push({ tsMs: p.tsMs[i], equipment: p.equipment, quantity: p.quantity, value: p.values[i] });
  // A stable sort: readings of one instant keep their point order, as a gateway message has them.
  return out.sort((a, b) => a.tsMs - b.tsMs);
}

/** The longest look back of the site's rules (the monitor keeps that much history), in seconds. */
export function warmUpS(db: Db, siteId: string): number {
  return createSiteMonitor({ site: [], settings: loadRuleSettings(db, siteId) }).history.retentionS;
}

export interface WindowReevaluation extends RuleReplay {
  recorded: ReplayTransitionDto[];
  /** Readable lines, one per transition only one side has (rule-caused ones); empty when they agree. */
  differences: string[];
  warmUpFromMs: number;
  /** Rule settings, equipment or limits changed since the warm-up began: the replay ran with today's. */
  changedSince: Array<{ atMs: number; entityType: string; summary: string }>;
}

/**
 * Re-runs the rules over a stored window with the site's rule settings and equipment limits as
 * they are now, from a monitor warmed on the readings of the rules' look-back before the window
 * (so trends, dead bands and on/off delays stand as they did live), and compares the transitions
 * with those recorded. `warm: false` starts cold at `fromMs`.
 */
export function reevaluateWindow(
  db: Db,
  viewer: Viewer,
  siteId: string,
  fromMs: number,
  toMs: number,
  opts: { warm?: boolean } = {},
): WindowReevaluation {
  const warmUpFromMs = opts.warm === false ? fromMs : fromMs - warmUpS(db, siteId) * 1000;
  const readings = readingsOf(replayReadings(db, viewer, siteId, warmUpFromMs, toMs));
  const result = replayRules({
    site: siteEquipment(db, siteId),
    settings: loadRuleSettings(db, siteId),
    timeZone: siteTimeZone(db, siteId),
    readings,
    fromMs,
    toMs,
  });
  const recorded = recordedTransitions(db, viewer, siteId, fromMs, toMs);
  return {
    ...result,
    recorded,
    differences: diffTransitions(recorded, result.transitions),
    warmUpFromMs,
    changedSince: ruleInputChangesSince(db, viewer, siteId, warmUpFromMs),
  };
}
