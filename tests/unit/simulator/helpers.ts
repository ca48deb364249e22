// Test helpers: run a scenario and index its readings by equipment and quantity.
import { runPlant, type RunScenarioOptions, type SimEvent } from "@/simulator/run";
import type { PlantState } from "@/simulator/state";

export interface Series {
  t: number[]; // scenario seconds
  v: Array<number | boolean | string>;
}

export interface RunRecord {
  series: Map<string, Series>;
  events: SimEvent[];
  states: PlantState[];
  get(equipment: string, quantity: string): Series;
  num(equipment: string, quantity: string): { t: number[]; v: number[] };
}

export function record(
  opts: Omit<RunScenarioOptions, "startMs"> & { startMs?: number; keepStates?: boolean },
): RunRecord {
  const startMs = opts.startMs ?? Date.UTC(2026, 5, 1, 0, 0, 0);
  const series = new Map<string, Series>();
  const events: SimEvent[] = [];
  const states: PlantState[] = [];
  for (const s of runPlant({ ...opts, startMs })) {
    const t = (s.tsMs - startMs) / 1000;
    for (const r of s.readings) {
      const k = `${r.equipment}|${r.quantity}`;
      let ser = series.get(k);
      if (!ser) series.set(k, (ser = { t: [], v: [] }));
      ser.t.push(t);
      ser.v.push(r.value);
    }
    events.push(...s.events);
    if (opts.keepStates) states.push(s.state);
  }
  const get = (e: string, q: string) => {
    const s = series.get(`${e}|${q}`);
    if (!s) throw new Error(`no series ${e} ${q}`);
    return s;
  };
  return { series, events, states, get, num: (e, q) => ({ t: get(e, q).t, v: get(e, q).v as number[] }) };
}

export const cToF = (c: number) => (c * 9) / 5 + 32;
export const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;
/** Values of a series within [fromS, toS]. */
export function window(s: { t: number[]; v: number[] }, fromS: number, toS: number): number[] {
  const out: number[] = [];
  for (let i = 0; i < s.t.length; i++) if (s.t[i] >= fromS && s.t[i] <= toS) out.push(s.v[i]);
  return out;
}
/** First scenario second at which `pred` holds on the series, or undefined. */
export function firstTime<T>(s: { t: number[]; v: T[] }, pred: (v: T, i: number) => boolean): number | undefined {
  for (let i = 0; i < s.t.length; i++) if (pred(s.v[i], i)) return s.t[i];
  return undefined;
}
