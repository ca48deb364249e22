// A site's recent readings per point, ordered by event time, for the rules to look back over.
// Rules only read it (`HistoryView`), and only up to the evaluation time, so the same readings
// give the same answers live, replayed or simulated faster than real time.

import type { QuantityKey } from "@/lib/quantities";
import type { LatestPoint, LatestValues, Reading, ReadingValue } from "@/lib/plant/site";
import type { TimedValue } from "@/lib/plant/trend";

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
  /** Event time of the oldest reading this history was ever given (null before the first). */
  firstSeenAt(): number | null;
  tags(): string[];
}

const MAX_EDGES = 64;

/**
 * One point's samples, oldest first, in two Float64Arrays (event time, value; booleans as 0/1)
 * rather than an object per sample, since a portfolio keeps hours of readings of every point
 * here and objects would fill the heap. A series that is
 * given a string (state and text points) keeps its values in a plain array beside the times.
 */
class Series {
  private ts = new Float64Array(64);
  private num = new Float64Array(64);
  private other: ReadingValue[] | null = null;
  private kind: "number" | "boolean" | null = null;
  private head = 0;
  private tail = 0;

  get length(): number {
    return this.tail - this.head;
  }

  tsAt(i: number): number {
    return this.ts[this.head + i];
  }

  valueAt(i: number): ReadingValue {
    const k = this.head + i;
    if (this.other) return this.other[k];
    return this.kind === "boolean" ? this.num[k] !== 0 : this.num[k];
  }

  /** Index of the last sample with ts ≤ atMs, or −1. */
  lastAtOrBefore(atMs: number): number {
    let lo = 0;
    let hi = this.length - 1;
    let found = -1;
    while (lo <= hi) {
      const mid = (lo + hi) >> 1;
      if (this.ts[this.head + mid] <= atMs) {
        found = mid;
        lo = mid + 1;
      } else hi = mid - 1;
    }
    return found;
  }

  /** Inserts after every sample with ts ≤ tsMs (an append for in-order readings); returns its index. */
  insert(tsMs: number, value: ReadingValue): number {
    this.adopt(value);
    const i = this.length === 0 || this.tsAt(this.length - 1) <= tsMs ? this.length : this.lastAtOrBefore(tsMs) + 1;
    this.reserve();
    const k = this.head + i;
    if (k < this.tail) {
      this.ts.copyWithin(k + 1, k, this.tail);
      if (this.other) this.other.splice(k, 0, value);
      else this.num.copyWithin(k + 1, k, this.tail);
    } else if (this.other) this.other[k] = value;
    this.ts[k] = tsMs;
    if (!this.other) this.num[k] = typeof value === "boolean" ? (value ? 1 : 0) : (value as number);
    this.tail++;
    return i;
  }

  /** Drops the first `n` samples. */
  drop(n: number): void {
    this.head += n;
    if (this.head === this.tail) this.head = this.tail = 0;
  }

  /** Settles the representation on the first value; a value that does not fit moves the series to a plain array. */
  private adopt(value: ReadingValue) {
    if (this.other) return;
    const kind = typeof value === "number" ? "number" : typeof value === "boolean" ? "boolean" : null;
    if (this.length === 0 && kind) {
      this.kind = kind;
      return;
    }
    if (kind && kind === this.kind) return;
    const other: ReadingValue[] = new Array(this.tail);
    for (let k = this.head; k < this.tail; k++) other[k] = this.kind === "boolean" ? this.num[k] !== 0 : this.num[k];
    this.other = other;
  }

  /**
   * Room for one more sample at the end: slide the samples to the front once an eighth of the
   * array is free (a memmove of a few KB every hundred or so adds), else double it. Starting at
   * 64 and doubling cut the allocations of 100,000 growing series after a start (an add cost
   * 362 ns, now ~220 ns); sliding at an eighth keeps a point's 70 min at 5 s in 1,024 slots.
   */
  private reserve() {
    if (this.tail < this.ts.length) return;
    const n = this.length;
    if (n + 1 <= this.ts.length * 0.875) {
      this.ts.copyWithin(0, this.head, this.tail);
      if (this.other) this.other = this.other.slice(this.head, this.tail);
      else this.num.copyWithin(0, this.head, this.tail);
    } else {
      const size = this.ts.length * 2;
      const ts = new Float64Array(size);
      ts.set(this.ts.subarray(this.head, this.tail));
      this.ts = ts;
      if (this.other) this.other = this.other.slice(this.head, this.tail);
      else {
        const num = new Float64Array(size);
        num.set(this.num.subarray(this.head, this.tail));
        this.num = num;
      }
    }
    this.head = 0;
    this.tail = n;
  }
}

export class ReadingHistory implements HistoryView {
  private readonly series = new Map<string, Map<QuantityKey, Series>>();
  private readonly changeLog = new Map<string, ValueChange[]>();
  private firstMs: number | null = null;

  /** Keeps `retentionS` of history behind the newest reading (the longest rule window plus slack). */
  constructor(readonly retentionS = 2 * 3600) {}

  add(r: Reading): void {
    if (this.firstMs === null || r.tsMs < this.firstMs) this.firstMs = r.tsMs;
    let byQ = this.series.get(r.equipment);
    if (!byQ) this.series.set(r.equipment, (byQ = new Map()));
    let list = byQ.get(r.quantity);
    if (!list) byQ.set(r.quantity, (list = new Series()));
    // Readings usually arrive in order; late ones are slotted in by time.
    const i = list.insert(r.tsMs, r.value);
    if (i === list.length - 1 && typeof r.value !== "number") this.recordChange(r.equipment, r.quantity, list);
    this.prune(list, list.tsAt(list.length - 1));
  }

  addAll(readings: Iterable<Reading>): void {
    for (const r of readings) this.add(r);
  }

  private recordChange(tag: string, q: QuantityKey, list: Series): void {
    // Changes are derived from in-order arrivals; a late reading is not re-scanned.
    if (list.length < 2) return;
    const prev = list.valueAt(list.length - 2);
    const cur = list.valueAt(list.length - 1);
    if (prev === cur) return;
    const key = `${tag}\u0000${q}`;
    const log = this.changeLog.get(key) ?? [];
    log.push({ tsMs: list.tsAt(list.length - 1), from: prev, to: cur });
    if (log.length > MAX_EDGES) log.shift();
    this.changeLog.set(key, log);
  }

  private prune(list: Series, newestMs: number): void {
    const cutoff = newestMs - this.retentionS * 1000;
    let drop = 0;
    // Keep one sample older than the cutoff so "latest at the start of a window" still resolves.
    while (drop < list.length - 1 && list.tsAt(drop + 1) < cutoff) drop++;
    if (drop > 0) list.drop(drop);
  }

  latestAt(tag: string, q: QuantityKey, atMs: number): LatestPoint | undefined {
    const list = this.series.get(tag)?.get(q);
    if (!list) return undefined;
    const i = list.lastAtOrBefore(atMs);
    return i < 0 ? undefined : { value: list.valueAt(i), tsMs: list.tsAt(i) };
  }

  numbers(tag: string, q: QuantityKey, fromMs: number, toMs: number): TimedValue[] {
    const list = this.series.get(tag)?.get(q);
    if (!list) return [];
    const out: TimedValue[] = [];
    for (let i = list.lastAtOrBefore(fromMs - 1) + 1; i < list.length && list.tsAt(i) <= toMs; i++) {
      const v = list.valueAt(i);
      if (typeof v === "number" && Number.isFinite(v)) out.push({ tsMs: list.tsAt(i), value: v });
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
        const i = list.lastAtOrBefore(atMs);
        if (i >= 0) points[q] = { value: list.valueAt(i), tsMs: list.tsAt(i) };
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
      const i = list.lastAtOrBefore(atMs);
      if (i >= 0 && (newest === null || list.tsAt(i) > newest)) newest = list.tsAt(i);
    }
    return newest;
  }

  firstSeenAt(): number | null {
    return this.firstMs;
  }

  tags(): string[] {
    return [...this.series.keys()];
  }
}

export function lastEdgeMs(edges: number[]): number | null {
  return edges.length ? edges[edges.length - 1] : null;
}
