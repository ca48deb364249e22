// One ordered list of what happened during an incident, in event time: alarm transitions, plant
// events read from the gateway's state points, and people's entries. Pure.

import type { QuantityKey } from "@/lib/quantities";

export const timelineKinds = [
  "plant",
  "alarm",
  "acknowledgement",
  "shelving",
  "note",
  "visit",
  "change_made",
  "change_put_back",
] as const;
export type TimelineKind = (typeof timelineKinds)[number];

export interface TimelineEntry {
  atMs: number;
  kind: TimelineKind;
  /** Equipment tag, or `site`. */
  equipment: string | null;
  text: string;
  who: string | null;
  /** For alarm entries: the alarm's rule and priority. */
  ruleId?: string;
  priority?: number;
}

/** State points whose changes are plant events the gateway reported. */
export const plantEventQuantities = [
  "run_status",
  "chiller_stop_reason",
  "drive_fault",
  "chiller_alarm",
  "fault_text",
  "fan_drive_mode",
  "fan_drive_fault",
  "fan_status",
  "pump_status",
  "pump_fault",
] as const satisfies readonly QuantityKey[];
export type PlantEventQuantity = (typeof plantEventQuantities)[number];

export interface StateSeries {
  equipment: string;
  quantity: PlantEventQuantity;
  /** In event-time order; booleans may come as 0/1 (how the store keeps them). */
  points: readonly { tsMs: number; value: number | string | boolean | null }[];
}

const asBool = (v: number | string | boolean | null) => (typeof v === "string" ? v === "true" : Boolean(v));

function describe(q: PlantEventQuantity, value: number | string | boolean | null): string | null {
  switch (q) {
    case "run_status":
      return asBool(value) ? "started (run proven)" : "stopped";
    case "chiller_stop_reason":
      return value ? `stop reason: ${String(value).replaceAll("_", " ")}` : null;
    case "drive_fault":
      return asBool(value) ? "drive fault" : "drive fault cleared";
    case "chiller_alarm":
      return asBool(value) ? "latched alarm (trip)" : "latched alarm reset";
    case "fault_text":
      return value ? `fault: ${String(value)}` : null;
    case "fan_drive_mode":
      return value ? `fan drive mode: ${String(value)}` : null;
    case "fan_drive_fault":
      return asBool(value) ? "fan drive fault" : "fan drive fault cleared";
    case "fan_status":
      return asBool(value) ? "fan proven running" : "fan stopped";
    case "pump_status":
      return asBool(value) ? "pump proven running" : "pump stopped";
    case "pump_fault":
      return asBool(value) ? "pump fault" : "pump fault cleared";
  }
}

const same = (a: number | string | boolean | null, b: number | string | boolean | null, q: PlantEventQuantity) =>
  q === "chiller_stop_reason" || q === "fan_drive_mode" || q === "fault_text"
    ? String(a ?? "") === String(b ?? "")
    : asBool(a) === asBool(b);

/**
 * Changes of each state point within [fromMs, toMs]: the first reading sets where it stood (no
 * event), every later change is one. Readings before `fromMs` only set the starting state.
 */
export function plantEvents(series: readonly StateSeries[], fromMs: number, toMs: number): TimelineEntry[] {
  const out: TimelineEntry[] = [];
  for (const s of series) {
    let prev: number | string | boolean | null | undefined;
    for (const p of s.points) {
      if (p.tsMs > toMs) break;
      if (prev !== undefined && !same(prev, p.value, s.quantity) && p.tsMs >= fromMs) {
        const text = describe(s.quantity, p.value);
        if (text) out.push({ atMs: p.tsMs, kind: "plant", equipment: s.equipment, text, who: null });
      }
      prev = p.value;
    }
  }
  return out;
}

/**
 * People's entries carry wall-clock time; on a simulated or replayed site event time runs apart
 * from it, so each is placed by the offset of the nearest alarm transition recorded before it
 * (which has both clocks). Without one, wall time is event time (a live plant).
 */
export function wallToEventTime(pairs: readonly { wallMs: number; eventMs: number }[], wallMs: number): number {
  let best: { wallMs: number; eventMs: number } | null = null;
  for (const p of pairs) if (p.wallMs <= wallMs && (!best || p.wallMs > best.wallMs)) best = p;
  return best ? best.eventMs + (wallMs - best.wallMs) : wallMs;
}

/** In event-time order; at the same instant the plant's own events come before what people did about them. */
export function orderTimeline(entries: readonly TimelineEntry[]): TimelineEntry[] {
  const rank = (k: TimelineKind) => timelineKinds.indexOf(k);
  return entries
    .map((e, i) => ({ e, i }))
    .sort((a, b) => a.e.atMs - b.e.atMs || rank(a.e.kind) - rank(b.e.kind) || a.i - b.i)
    .map(({ e }) => e);
}

/** The points a review charts for its alarms: the crossover set whenever the chain reached a chiller. */
export function trendQuantitiesFor(ruleIds: readonly string[]): {
  chiller: QuantityKey[];
  tower: QuantityKey[];
} {
  const chiller: QuantityKey[] = [
    "condenser_water_entering_temp",
    "condenser_water_leaving_temp",
    "chilled_water_entering_temp",
    "chilled_water_leaving_temp",
    "condenser_refrigerant_pressure",
    "evaporator_refrigerant_pressure",
    "drive_temp",
    "run_status",
  ];
  const tower: QuantityKey[] = ["fan_drive_mode", "fan_speed", "fan_status"];
  if (ruleIds.includes("pump_not_proven")) chiller.push("compressor_power");
  if (ruleIds.includes("barrel_flow_lost")) chiller.push("evaporator_water_dp", "condenser_water_dp");
  return { chiller, tower };
}
