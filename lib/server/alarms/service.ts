import type { Db } from "@/db/client";
import { findAlarmRef, getRuleOverrides, loadAlarmMachines, saveAlarmChanges } from "@/db/queries/alarms";
import type { AlarmDetail } from "@/lib/dto/alarms";
import { isSiteRetired, siteEquipment, siteTimeZone } from "@/db/queries/sites";
import { commandAlarm, type Alarm, type AlarmBook, type AlarmEvent, type TransitionRecord } from "@/lib/alarms";
import { canAct, type Viewer } from "@/lib/auth/viewer";
import { AppError, notFound } from "@/lib/errors";
import type { Reading, Site } from "@/lib/plant/site";
import type { SiteSnapshot } from "@/lib/plant/snapshot";
import {
  createSiteMonitor,
  marginSeries,
  parseRuleSettings,
  type CommStatus,
  type RuleContext,
  type SiteMonitor,
} from "@/lib/rules";
import { EVALUATION_STEP_MS, isEvaluationDue } from "@/lib/rules/schedule";
import type { StorageHealth } from "../storage-health";
import type { IncidentFiler } from "../incidents";

// Runs the rule checks of every site on the readings ingestion commits, on event time,
// and keeps the alarms' ISA-18.2 state in the database. People's commands (acknowledge,
// shelve, unshelve) go through here too, so the in-memory machines and the rows agree.

/**
 * A due evaluation waits for a newer reading (so every reading of its instant is in, however
 * the gateway split its messages and the writer its flushes) or, when none comes, this long.
 */
export const SETTLE_MS = 250;
/** Longest run of settling evaluations in one turn of the event loop, ms. */
const SETTLE_SLICE_MS = 8;
/** No reading for this long (wall clock): event time is run on with the wall clock, so silence is noticed. */
export const SILENCE_MS = 60_000;
/**
 * Evaluations run per call at most: a gateway's backfill of hours calls for thousands, and the
 * event loop must keep serving pages and PUBACKs between them (the rest run on later turns).
 */
const MAX_EVALUATIONS_PER_CALL = 50;

export type AlarmCommand =
  | { type: "acknowledge"; note?: string }
  | { type: "shelve"; minutes: number; reason: string }
  | { type: "unshelve"; note?: string };

export interface SiteEvaluationSummary {
  siteId: string;
  atMs: number;
  snapshot: SiteSnapshot;
  transitions: TransitionRecord[];
}

export interface AlarmService {
  /**
   * Adds readings to the site's history; true when an evaluation is due (evaluateDue). The
   * readings are read during the call and none is kept (the rule feed reuses them).
   */
  record(siteId: string, readings: readonly Reading[]): boolean;
  /**
   * Runs the rule checks at the evaluation times the readings called for (lib/rules/schedule.ts)
   * once a newer reading shows each time's readings are all in; true when some are left for a later call.
   */
  evaluateDue(siteId: string): boolean;
  /** Runs due evaluations whose readings have settled (SETTLE_MS without a newer one). */
  settle(): void;
  command(viewer: Viewer, alarmId: string, command: AlarmCommand): { alarmId: string; state: string };
  /** An alarm's latest words and numbers from the running rules (fresher than the stored copy), by site and key. */
  latestDetail(siteId: string, key: string): AlarmDetail | undefined;
  /** The last derived numbers of a site (for its page), or null before any reading. */
  snapshot(siteId: string): SiteSnapshot | null;
  /** Crossover margin per chiller over the last `windowS` of event time, at most `maxPoints` each. */
  marginTrend(
    siteId: string,
    windowS: number,
    maxPoints?: number,
  ): Record<string, { tsMs: number[]; marginK: number[] }>;
  /**
   * Re-reads a site's equipment records, limits and rule settings at once, keeping its reading
   * history and alarms; a retired site's checks stop.
   */
  reload(siteId: string): void;
  /** Drops a site's monitor (its timeline was replaced); the next reading rebuilds it from the database. */
  forget(siteId: string): void;
  /** Wall-clock housekeeping: shelf expiry and silence, extrapolating event time. */
  tick(): void;
}

interface SiteState {
  site: Site;
  /** A retired site's readings are not checked (its gateways are refused too). */
  retired: boolean;
  monitor: SiteMonitor;
  lastEvaluatedMs: number;
  /** Evaluation times the readings called for and not yet run, ascending. */
  pending: number[];
  /** The last evaluation time scheduled (run or pending). */
  lastScheduledMs: number;
  latestEventMs: number;
  latestWallMs: number;
  /** Wall time of the last reading ingested (for SETTLE_MS). */
  ingestWallMs: number;
  snapshot: SiteSnapshot | null;
  details: Map<string, AlarmDetail>;
  /** Per alarm key, the words last written and their event time: numbers that move are rewritten at most every DETAIL_REFRESH_MS. */
  savedDetails: Map<string, { atMs: number; words: string }>;
  /** Changes the rule checks made that could not be saved yet (a full disk); saved with the next ones. */
  unsaved: { alarms: Map<string, Alarm>; transitions: TransitionRecord[] };
}

/**
 * An active alarm's stored numbers are refreshed at most this often (event time); changed words are saved at once.
 * Every active alarm of a portfolio rewritten at each 5-s evaluation, or every 30 s, held the write lock often
 * enough to cost the ingest benchmark a quarter of its capacity (339k → 258k readings/s); the alarm page reads
 * the latest words from memory instead (`latestDetail`).
 */
const DETAIL_REFRESH_MS = 5 * 60_000;

/** The words without their numbers: a change of what is said is saved at once, a number that moved with the refresh. */
const wordsOf = (d: AlarmDetail) =>
  JSON.stringify([d.technicianMessage, d.ownerMessage, d.advice, d.caution]).replace(/\d+(?:\.\d+)?/g, "#");

/** True when the alarm's latest words differ from those stored, or its numbers are older than DETAIL_REFRESH_MS. */
function detailMoved(s: SiteState, key: string): boolean {
  const d = s.details.get(key);
  if (!d) return false;
  const saved = s.savedDetails.get(key);
  return !saved || saved.words !== wordsOf(d) || d.atMs - saved.atMs >= DETAIL_REFRESH_MS;
}

/** Transitions kept for a later save at most, per site, while the database cannot be written. */
const MAX_UNSAVED_TRANSITIONS = 10_000;

export function loadRuleSettings(db: Db, siteId: string) {
  return parseRuleSettings(getRuleOverrides(db, siteId));
}

export function createAlarmService(deps: {
  db: Db;
  clock: () => number;
  comms?: (siteId: string) => CommStatus;
  onEvaluated?: (summary: SiteEvaluationSummary) => void;
  onAlarmsChanged?: (siteId: string, transitions: TransitionRecord[]) => void;
  log?: (line: string) => void;
  storage?: Pick<StorageHealth, "report" | "ok">;
  /** Groups stored activations into incidents and ends quiet ones (lib/server/incidents.ts). */
  incidents?: IncidentFiler;
}): AlarmService {
  const { db } = deps;
  const sites = new Map<string, SiteState>();
  let settleTimer: ReturnType<typeof setTimeout> | null = null;
  let settleSoon: ReturnType<typeof setImmediate> | null = null;

  function state(siteId: string): SiteState {
    let s = sites.get(siteId);
    if (!s) {
      const book: AlarmBook = new Map(loadAlarmMachines(db, siteId).map((a) => [a.key, a]));
      const site = siteEquipment(db, siteId);
      s = {
        site,
        retired: isSiteRetired(db, siteId),
        monitor: createSiteMonitor({
          site,
          settings: loadRuleSettings(db, siteId),
          alarms: book,
          timeZone: siteTimeZone(db, siteId),
        }),
        lastEvaluatedMs: -Infinity,
        pending: [],
        lastScheduledMs: -Infinity,
        latestEventMs: -Infinity,
        latestWallMs: deps.clock(),
        ingestWallMs: deps.clock(),
        snapshot: null,
        details: new Map(),
        savedDetails: new Map(),
        unsaved: { alarms: new Map(), transitions: [] },
      };
      sites.set(siteId, s);
    }
    return s;
  }

  /**
   * Saves what changed between `before` and now, with anything an earlier save could not write.
   * A person's command that cannot be saved throws (the caller undoes it and they are told); the
   * rule checks' changes stay in memory and are saved with the next ones.
   */
  function persist(
    siteId: string,
    s: SiteState,
    before: AlarmBook,
    transitions: TransitionRecord[],
    by: "rules" | "person",
  ) {
    const after = s.monitor.alarms();
    const changed = new Map(s.unsaved.alarms);
    for (const [key, a] of after) {
      // Rows exist for alarms that ever left normal; keep their words fresh while active.
      if (!(transitions.some((t) => t.alarmKey === key) || a.conditionActive || a.state !== "normal")) continue;
      if (before.get(key) !== a || detailMoved(s, key)) changed.set(key, a);
    }
    const all = s.unsaved.transitions.length ? [...s.unsaved.transitions, ...transitions] : transitions;
    if (!changed.size && !all.length) return;
    let stored;
    try {
      stored = saveAlarmChanges(db, siteId, [...changed.values()], all, s.details);
    } catch (err) {
      if (!deps.storage?.report(err, "alarms") || by === "person") throw err;
      deps.log?.(`[alarms] ${siteId}: changes kept in memory until the database can be written: ${String(err)}`);
      s.unsaved = { alarms: changed, transitions: all.slice(-MAX_UNSAVED_TRANSITIONS) };
      return;
    }
    s.unsaved = { alarms: new Map(), transitions: [] };
    for (const key of changed.keys()) {
      const d = s.details.get(key);
      if (d) s.savedDetails.set(key, { atMs: d.atMs, words: wordsOf(d) });
    }
    deps.storage?.ok();
    deps.incidents?.saved(siteId, stored);
    if (all.length) deps.onAlarmsChanged?.(siteId, all);
  }

  function evaluateAt(siteId: string, s: SiteState, atMs: number): SiteEvaluationSummary {
    const before = s.monitor.alarms();
    const result = s.monitor.evaluate(atMs, deps.comms?.(siteId));
    s.lastEvaluatedMs = atMs;
    s.snapshot = result.snapshot;
    for (const c of result.conditions) {
      if (!c.rawActive && !c.active) continue;
      s.details.set(`${c.ruleId}:${c.equipment}`, {
        technicianMessage: c.technicianMessage,
        ownerMessage: c.ownerMessage,
        advice: c.advice,
        caution: c.caution,
        numbers: c.numbers,
        related: c.related,
        atMs,
      });
    }
    persist(siteId, s, before, result.transitions, "rules");
    deps.incidents?.evaluated(siteId, atMs);
    const summary = { siteId, atMs, snapshot: result.snapshot, transitions: result.transitions };
    deps.onEvaluated?.(summary);
    return summary;
  }

  function record(siteId: string, readings: readonly Reading[]): boolean {
    if (!readings.length) return false;
    const s = state(siteId);
    if (s.retired) return false;
    // Usually already in event-time order; copied and sorted only when not.
    let ordered = true;
    for (let i = 1; i < readings.length && ordered; i++) ordered = readings[i - 1].tsMs <= readings[i].tsMs;
    const sorted = ordered ? readings : [...readings].sort((a, b) => a.tsMs - b.tsMs);
    s.monitor.ingest(sorted);
    // The evaluation times depend on the readings' times only, never on how they were batched.
    for (const r of sorted)
      if (isEvaluationDue(s.lastScheduledMs, r.tsMs)) {
        s.pending.push(r.tsMs);
        s.lastScheduledMs = r.tsMs;
      }
    const newest = sorted[sorted.length - 1].tsMs;
    if (newest > s.latestEventMs) {
      s.latestEventMs = newest;
      s.latestWallMs = deps.clock();
    }
    s.ingestWallMs = deps.clock();
    // A gateway's last sample has no newer reading behind it: settle it as soon as it has been quiet
    // for SETTLE_MS rather than on the next 1-s tick, so a page goes out within a fraction of a second.
    if (s.pending.length && !settleTimer)
      settleTimer = setTimeout(() => {
        settleTimer = null;
        try {
          service.settle();
        } catch (err) {
          // The 1-s housekeeping tick settles it again and reports a full disk.
          deps.log?.(`[alarms] settling evaluations failed: ${String(err)}`);
        }
      }, SETTLE_MS + 10).unref();
    return s.pending.length > 0 && s.pending[0] < s.latestEventMs;
  }

  /** Runs pending evaluations before `untilMs` (all with Infinity), in order, a bounded number; true when some are left. */
  function runPending(siteId: string, s: SiteState, untilMs: number, max = MAX_EVALUATIONS_PER_CALL): boolean {
    let n = 0;
    while (n < s.pending.length && n < max && s.pending[n] < untilMs) n++;
    const times = s.pending.splice(0, n);
    for (const atMs of times) evaluateAt(siteId, s, atMs);
    return s.pending.length > 0 && s.pending[0] < untilMs;
  }

  function evaluateDue(siteId: string): boolean {
    const s = sites.get(siteId);
    // A time is complete once a newer reading arrived: an in-order gateway sent all of it.
    return !!s && !s.retired && runPending(siteId, s, s.latestEventMs);
  }

  const service: AlarmService = {
    record,
    evaluateDue,
    command(viewer, alarmId, command) {
      const ref = findAlarmRef(db, viewer, alarmId);
      if (!ref) throw notFound("No such alarm.");
      if (!canAct(viewer)) throw new AppError("forbidden", "Only the service company's staff can act on alarms.");
      const s = state(ref.siteId);
      // Commands happen on the site's clock so shelving and history line up with its readings.
      const atMs = Number.isFinite(s.latestEventMs) ? s.latestEventMs + (deps.clock() - s.latestWallMs) : deps.clock();
      const actor = { kind: "person" as const, id: viewer.userId };
      const event: AlarmEvent =
        command.type === "acknowledge"
          ? { type: "acknowledge", atMs, actor, note: command.note }
          : command.type === "shelve"
            ? { type: "shelve", atMs, actor, untilMs: atMs + command.minutes * 60_000, reason: command.reason }
            : { type: "unshelve", atMs, actor, note: command.note };
      const before = s.monitor.alarms();
      const result = commandAlarm(before, ref.key, event);
      if (result.rejected) throw new AppError("conflict", `Not done: ${result.rejected}.`);
      s.monitor.setAlarms(result.book);
      try {
        persist(ref.siteId, s, before, result.transitions, "person");
      } catch (err) {
        s.monitor.setAlarms(before);
        throw err;
      }
      return { alarmId, state: result.alarm.state };
    },
    snapshot: (siteId) => sites.get(siteId)?.snapshot ?? null,
    latestDetail: (siteId, key) => sites.get(siteId)?.details.get(key),
    marginTrend(siteId, windowS, maxPoints = 180) {
      const s = sites.get(siteId);
      if (!s || !Number.isFinite(s.latestEventMs)) return {};
      // marginSeries reads only the site, the history and the time from its context.
      const probe = { site: s.site, history: s.monitor.history, nowMs: s.latestEventMs } as Pick<
        RuleContext,
        "site" | "history" | "nowMs"
      > as RuleContext;
      const out: Record<string, { tsMs: number[]; marginK: number[] }> = {};
      for (const chiller of s.site.filter((e) => e.kind === "chiller")) {
        const series = marginSeries(probe, chiller, windowS);
        // Even thinning is enough for a sparkline; the trend API keeps spikes for real charts.
        const step = Math.max(1, Math.ceil(series.length / maxPoints));
        const kept = series.filter((_, i) => i % step === 0 || i === series.length - 1);
        out[chiller.tag] = { tsMs: kept.map((p) => p.tsMs), marginK: kept.map((p) => p.value) };
      }
      return out;
    },
    settle() {
      const now = deps.clock();
      // A slice per turn of the event loop: every site's evaluation falls due at the same 5-s step of
      // event time, and running them all in one call would hold PUBACKs and pushes for a whole portfolio.
      const until = performance.now() + SETTLE_SLICE_MS;
      for (const [siteId, s] of sites) {
        if (s.retired || !s.pending.length || now - s.ingestWallMs < SETTLE_MS) continue;
        runPending(siteId, s, Infinity);
        if (performance.now() >= until) {
          if (!settleSoon)
            settleSoon = setImmediate(() => {
              settleSoon = null;
              service.settle();
            });
          return;
        }
      }
    },
    forget(siteId) {
      sites.delete(siteId);
    },
    reload(siteId) {
      const old = sites.get(siteId);
      if (!old) return;
      if (old.unsaved.transitions.length || old.unsaved.alarms.size) {
        // Changes not yet saved would be lost with the old monitor: rebuilt on the next reading instead.
        sites.delete(siteId);
        return;
      }
      const site = siteEquipment(db, siteId);
      sites.set(siteId, {
        ...old,
        site,
        retired: isSiteRetired(db, siteId),
        monitor: createSiteMonitor({
          site,
          settings: loadRuleSettings(db, siteId),
          alarms: old.monitor.alarms(),
          timeZone: siteTimeZone(db, siteId),
          history: old.monitor.history,
        }),
        // The schedule stays the readings' (lib/rules/schedule.ts): the new limits apply from the next step.
      });
    },
    tick() {
      const now = deps.clock();
      for (const [siteId, s] of sites) {
        if (s.retired || !Number.isFinite(s.latestEventMs)) continue;
        runPending(siteId, s, Infinity, Infinity);
        // Only a silent site runs on the wall clock (silence is noticed, shelves expire): while
        // readings flow, evaluations follow their times alone, so a replay finds the same ones.
        if (now - s.latestWallMs < SILENCE_MS) continue;
        const extrapolated = s.latestEventMs + (now - s.latestWallMs);
        if (extrapolated - s.lastEvaluatedMs >= EVALUATION_STEP_MS) {
          evaluateAt(siteId, s, extrapolated);
          s.lastScheduledMs = Math.max(s.lastScheduledMs, extrapolated);
        }
      }
    },
  };
  return service;
}
