// A site's recent readings per point, ordered by event time, for the rules to look back over.
// Rules only read it (`HistoryView`), and only up to the evaluation time, so the same readings
// give the same answers live, replayed or simulated faster than real time.

import type { QuantityKey } from "@/lib/quantities";
import type { LatestPoint, LatestValues, Reading, ReadingValue } from "@/lib/plant/site";
import type { TimedValue } from "@/lib/plant/trend";

interface Sample {
  tsMs: number;
  value: ReadingValue;
}

/** A change of a boolean or state/text point between consecutive readings. */
export interface ValueChange {
  tsMs: number;
  from: ReadingValue;
  to: ReadingValue;
}

export interface BooleanEdges {
  /** Event times the point went false → true and true → false (a short tail of them). */
  rises: number[];
  falls: number[];
}

export interface HistoryView {
  /** The newest value at or before `atMs`. */
  latestAt(tag: string, q: QuantityKey, atMs: number): LatestPoint | undefined;
  /** Numeric samples with fromMs ≤ ts ≤ toMs, oldest first. */
  numbers(tag: string, q: QuantityKey, fromMs: number, toMs: number): TimedValue[];
  /** Change times of a boolean point at or before `atMs`. */
  edges(tag: string, q: QuantityKey, atMs: number): BooleanEdges;
  /** Changes of a boolean, state or text point at or before `atMs`, oldest first. */
  changes(tag: string, q: QuantityKey, atMs: number): ValueChange[];
  /** Latest value of every point as of `atMs`. */
  latestValuesAt(atMs: number): LatestValues;
  /** Event time of the newest reading of any point of this equipment, at or before `atMs`. */
  lastSeenAt(tag: string, atMs: number): number | null;
  tags(): string[];
}

const MAX_EDGES = 64;

/** Index of the last sample with ts ≤ atMs, or −1. */
function lastAtOrBefore(samples: readonly Sample[], atMs: number): number {
  let lo = 0;
  let hi = samples.length - 1;
  let found = -1;
  while (lo <= hi) {
    const mid = (lo + hi) >> 1;
    if (samples[mid].tsMs <= atMs) {
      found = mid;
      lo = mid + 1;
    } else hi = mid - 1;
  }
  return found;
}

export class ReadingHistory implements HistoryView {
  private readonly series = new Map<string, Map<QuantityKey, Sample[]>>();
  private readonly changeLog = new Map<string, ValueChange[]>();

  /** Keeps `retentionS` of history behind the newest reading (the longest rule window plus slack). */
  constructor(readonly retentionS = 2 * 3600) {}

  add(r: Reading): void {
    let byQ = this.series.get(r.equipment);
    if (!byQ) this.series.set(r.equipment, (byQ = new Map()));
    let list = byQ.get(r.quantity);
    if (!list) byQ.set(r.quantity, (list = []));
    const sample = { tsMs: r.tsMs, value: r.value };
    // Readings usually arrive in order; late ones are slotted in by time.
    if (list.length === 0 || list[list.length - 1].tsMs <= r.tsMs) {
      list.push(sample);
      if (typeof r.value !== "number") this.recordChange(r.equipment, r.quantity, list);
    } else list.splice(lastAtOrBefore(list, r.tsMs) + 1, 0, sample);
    this.prune(list, r.tsMs);
  }

  addAll(readings: Iterable<Reading>): void {
    for (const r of readings) this.add(r);
  }

  private recordChange(tag: string, q: QuantityKey, list: Sample[]): void {
    // Changes are derived from in-order arrivals; a late reading is not re-scanned.
    if (list.length < 2) return;
    const prev = list[list.length - 2].value;
    const cur = list[list.length - 1];
    if (prev === cur.value) return;
    const key = `${tag}\u0000${q}`;
    const log = this.changeLog.get(key) ?? [];
    log.push({ tsMs: cur.tsMs, from: prev, to: cur.value });
    if (log.length > MAX_EDGES) log.shift();
    this.changeLog.set(key, log);
  }

  private prune(list: Sample[], newestMs: number): void {
    const cutoff = newestMs - this.retentionS * 1000;
    let drop = 0;
    // Keep one sample older than the cutoff so "latest at the start of a window" still resolves.
    while (drop < list.length - 1 && list[drop + 1].tsMs < cutoff) drop++;
    if (drop > 0) list.splice(0, drop);
  }

  latestAt(tag: string, q: QuantityKey, atMs: number): LatestPoint | undefined {
    const list = this.series.get(tag)?.get(q);
    if (!list) return undefined;
    const i = lastAtOrBefore(list, atMs);
    return i < 0 ? undefined : { value: list[i].value, tsMs: list[i].tsMs };
  }

  numbers(tag: string, q: QuantityKey, fromMs: number, toMs: number): TimedValue[] {
    const list = this.series.get(tag)?.get(q);
    if (!list) return [];
    const out: TimedValue[] = [];
    for (let i = lastAtOrBefore(list, fromMs - 1) + 1; i < list.length && list[i].tsMs <= toMs; i++) {
      const v = list[i].value;
      if (typeof v === "number" && Number.isFinite(v)) out.push({ tsMs: list[i].tsMs, value: v });
    }
    return out;
  }

  edges(tag: string, q: QuantityKey, atMs: number): BooleanEdges {
    const rises: number[] = [];
    const falls: number[] = [];
    for (const c of this.changes(tag, q, atMs)) {
      if (c.from === false && c.to === true) rises.push(c.tsMs);
      else if (c.from === true && c.to === false) falls.push(c.tsMs);
    }
    return { rises, falls };
  }

  changes(tag: string, q: QuantityKey, atMs: number): ValueChange[] {
    return (this.changeLog.get(`${tag}\u0000${q}`) ?? []).filter((c) => c.tsMs <= atMs);
  }

  latestValuesAt(atMs: number): LatestValues {
    const out: Record<string, Partial<Record<QuantityKey, LatestPoint>>> = {};
    for (const [tag, byQ] of this.series) {
      const points: Partial<Record<QuantityKey, LatestPoint>> = {};
      for (const [q, list] of byQ) {
        const i = lastAtOrBefore(list, atMs);
        if (i >= 0) points[q] = { value: list[i].value, tsMs: list[i].tsMs };
      }
      out[tag] = points;
    }
    return out;
  }

  lastSeenAt(tag: string, atMs: number): number | null {
    const byQ = this.series.get(tag);
    if (!byQ) return null;
    let newest: number | null = null;
    for (const list of byQ.values()) {
      const i = lastAtOrBefore(list, atMs);
      if (i >= 0 && (newest === null || list[i].tsMs > newest)) newest = list[i].tsMs;
    }
    return newest;
  }

  tags(): string[] {
    return [...this.series.keys()];
  }
}

export function lastEdgeMs(edges: number[]): number | null {
  return edges.length ? edges[edges.length - 1] : null;
}
