import type { Db } from "@/db/client";
import { listGatewayPresence } from "@/db/queries/gateways";
import { allSiteIds, mappedPoints, storedLatestValues } from "@/db/queries/readings";
import {
  freshnessByGateway,
  siteStatuses,
  type GatewayFreshness,
  type MappedPoint,
  type SiteStatusRow,
} from "@/lib/freshness";
import type { CommittedRows } from "@/gateway/row-columns";
import { qualityNames } from "@/lib/quality";
import { boardRoom, siteRoom, type SiteStatus, type SiteValues } from "@/lib/realtime/events";
import type { RealtimeServer } from "./server";

// Live values to browsers: the latest value per point is kept in memory, and each site room
// gets at most one `site:values` per push interval with only the points that changed, so
// the fan-out grows with sites watched, not with readings received. A site quiet for a whole
// interval is sent its values as soon as they commit (throttled on the leading edge), so a
// plant reporting every few seconds is not made to wait for a shared tick. Site data status (live,
// stale, offline) is worked out from the same memory: which points each gateway maps is
// loaded once and again when a gateway or point map changes, never a scan per round.

type Value = SiteValues["values"][number];

export interface LivePublisherOptions {
  io: Pick<RealtimeServer, "to">;
  db: Db;
  clock?: { now(): number };
  /** Shortest time between two `site:values` to one site (a few per second at most). */
  pushMs?: number;
  /** How often site data status is re-evaluated (stale after 3× interval, silence). */
  statusMs?: number;
  /** Whether any browser is in a room; values for a site nobody watches are not encoded at all. */
  watched?: (room: string) => boolean;
  /** The alarm side of `site:status`; another module owns it. */
  alarmSummary?: (siteId: string) => Pick<SiteStatus, "worst" | "unacknowledged">;
}

export interface LivePublisher {
  onCommitted(rows: CommittedRows): void;
  /** Re-evaluate site status soon (an alarm changed; presence has presenceChanged). */
  touch(siteId: string): void;
  /**
   * A gateway connected or went away: the next status question is answered afresh rather than
   * from the last round, so rule checks (which may run many evaluations a second while a
   * gateway catches up on buffered readings) never judge a link by a status from before it.
   */
  presenceChanged(siteId: string): void;
  latest(pointId: number): Value | undefined;
  /**
   * A site's data status as of the last status round (at most statusMs old, sooner after a
   * presence change): rule checks ask for it on every evaluation, so it must not cost a query.
   */
  dataStatus(siteId: string): SiteStatus["data"];
  /** A gateway was provisioned or revoked, or its point map replaced. */
  mappingChanged(): void;
  /** Drops the remembered values of these points (a simulated site's timeline was replaced). */
  forget(pointIds: readonly number[]): void;
  stop(): void;
}

/** Longest stretch of a status round between two turns of the event loop. */
const STATUS_SLICE_MS = 2;

export function createLivePublisher(opts: LivePublisherOptions): LivePublisher {
  const now = () => opts.clock?.now() ?? Date.now();
  const latest = new Map<number, Value>();
  const pending = new Map<string, Map<number, Value>>();
  const pushMs = opts.pushMs ?? 200;
  /** When each site's values were last sent (performance.now()). */
  const lastPushed = new Map<string, number>();
  const lastStatus = new Map<string, string>();
  let statusDue = true;
  let statuses: Map<string, SiteStatusRow> | undefined;
  // Which points each gateway maps: loaded once and again on mappingChanged() (every gateway,
  // point-map and site change goes through this process and says so), never on a timer.
  let mapping: { siteIds: string[]; mapped: MappedPoint[] } | undefined;

  // What was stored before this start, so sites are not "stale" until every point reports again.
  for (const v of storedLatestValues(opts.db)) latest.set(v.pointId, v);

  const latestTs = (id: number) => latest.get(id)?.tsMs;
  function currentMapping() {
    mapping ??= { siteIds: allSiteIds(opts.db), mapped: mappedPoints(opts.db) };
    return mapping;
  }

  /** All at once: when a status is asked for and none is current (after a presence change). */
  function computeStatuses() {
    const nowMs = now();
    const m = currentMapping();
    statuses = siteStatuses({
      siteIds: m.siteIds,
      presence: listGatewayPresence(opts.db),
      freshness: freshnessByGateway(m.mapped, latestTs, nowMs),
      nowMs,
    });
    return statuses;
  }

  /**
   * A status round spread over turns of the event loop, STATUS_SLICE_MS of work at a time, so a
   * large portfolio's round does not hold up the requests that arrive meanwhile.
   */
  async function computeStatusesInSlices() {
    const nowMs = now();
    const m = currentMapping();
    const into = new Map<string, GatewayFreshness>();
    const step = 5000;
    let until = performance.now() + STATUS_SLICE_MS;
    for (let from = 0; from < m.mapped.length; from += step) {
      freshnessByGateway(m.mapped, latestTs, nowMs, { from, to: Math.min(m.mapped.length, from + step), into });
      if (performance.now() >= until) {
        await new Promise((resolve) => setImmediate(resolve));
        until = performance.now() + STATUS_SLICE_MS;
      }
    }
    statuses = siteStatuses({ siteIds: m.siteIds, presence: listGatewayPresence(opts.db), freshness: into, nowMs });
    return statuses;
  }

  function pushSite(siteId: string, values: Map<number, Value>, at: number) {
    pending.delete(siteId);
    const room = siteRoom(siteId);
    if (opts.watched && !opts.watched(room)) return;
    lastPushed.set(siteId, at);
    const payload: SiteValues = { siteId, values: [...values.values()] };
    opts.io.to(room).emit("site:values", payload);
  }

  /** Sends every site whose interval has passed. */
  function pushValues() {
    if (pending.size === 0) return;
    const at = performance.now();
    for (const [siteId, values] of pending)
      if (at - (lastPushed.get(siteId) ?? -Infinity) >= pushMs) pushSite(siteId, values, at);
  }

  let statusRound: Promise<void> | undefined;
  function pushStatus() {
    statusRound ??= emitStatus()
      .catch((err) => console.error(`[live] status round failed: ${err instanceof Error ? err.stack : err}`))
      .finally(() => (statusRound = undefined));
  }

  async function emitStatus() {
    statusDue = false;
    for (const [siteId, s] of await computeStatusesInSlices()) {
      const extras = opts.alarmSummary?.(siteId) ?? { worst: null, unacknowledged: 0 };
      const payload: SiteStatus = { siteId, data: s.data, ...extras };
      const key = JSON.stringify(payload);
      if (lastStatus.get(siteId) === key) continue;
      lastStatus.set(siteId, key);
      opts.io.to([siteRoom(siteId), boardRoom(siteId)]).emit("site:status", payload);
    }
  }

  // Sites that were sent something less than pushMs ago wait here for the rest of their interval.
  const valuesTimer = setInterval(pushValues, Math.max(10, Math.round(pushMs / 4)));
  const statusTimer = setInterval(pushStatus, opts.statusMs ?? 2000);
  // A presence change shows within a second instead of waiting for the next full round.
  const dueTimer = setInterval(() => statusDue && pushStatus(), 500);
  for (const t of [valuesTimer, statusTimer, dueTimer]) t.unref();

  return {
    onCommitted(rows) {
      // Runs for every committed reading: rows of one message share a site, so the site's
      // pending map is looked up only when the site changes.
      let lastSite: string | undefined;
      let site: Map<number, Value> | undefined;
      for (let i = 0; i < rows.length; i++) {
        const pointId = rows.pointId(i);
        const ts = rows.ts(i);
        const prev = latest.get(pointId);
        // Out-of-order readings are stored but do not replace a newer live value.
        if (prev && prev.tsMs > ts) continue;
        // Updated in place: one object per point for the life of the process, not one per
        // reading for the garbage collector (a payload is serialised when it is emitted).
        let v = prev;
        if (v) {
          v.tsMs = ts;
          v.value = rows.live(i);
          v.quality = qualityNames[rows.quality(i)];
        } else
          latest.set(pointId, (v = { pointId, tsMs: ts, value: rows.live(i), quality: qualityNames[rows.quality(i)] }));
        const siteId = rows.siteId(i);
        if (siteId !== lastSite || !site) {
          lastSite = siteId;
          site = pending.get(siteId);
          if (!site) pending.set(siteId, (site = new Map()));
        }
        site.set(pointId, v);
        if (!prev) statusDue = true;
      }
      pushValues();
    },
    touch() {
      statusDue = true;
    },
    presenceChanged() {
      statusDue = true;
      statuses = undefined;
    },
    latest: (pointId) => latest.get(pointId),
    dataStatus(siteId) {
      return (statuses ?? computeStatuses()).get(siteId)?.data ?? "no_gateway";
    },
    mappingChanged() {
      mapping = undefined;
      statusDue = true;
    },
    forget(pointIds) {
      for (const id of pointIds) latest.delete(id);
      statusDue = true;
    },
    stop() {
      for (const t of [valuesTimer, statusTimer, dueTimer]) clearInterval(t);
    },
  };
}
