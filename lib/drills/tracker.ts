// Follows a drill's plant from its readings (canonical SI, as stored) and says when the drill ends:
// on recovery, on a crossover followed by a failed restart, or when its time runs out. Pure: the
// server feeds it the simulated gateway's samples; tests feed it the simulator directly.

export interface TrackedReading {
  equipment: string;
  quantity: string;
  value: number | boolean | string;
}

export type DrillEndReason = "recovery" | "failed_restart" | "time" | "stopped";

export interface ChillerTrack {
  tag: string;
  everRan: boolean;
  running: boolean;
  stopReason: string | null;
  /** Stopped on a latched trip a person must reset (stop reason `trip`). */
  trippedAtMs: number | null;
  lastStartMs: number | null;
  /** Pressure difference condenser − evaporator, kPa (last reading). */
  liftKPa: number | null;
  drivePeakC: number | null;
  timers: Record<"start-to-start" | "stop-to-start", { first: number | null; last: number | null }>;
}

export interface DrillFacts {
  startedAtMs: number;
  lastMs: number;
  /** First event time the refrigerant pressures inverted (condenser below evaporator) on a chiller that ran. */
  crossedAtMs: number | null;
  /** A start after the crossing that stopped again on a trip or a safety. */
  failedRestart: { atMs: number; chiller: string; stopReason: string; faultText: string | null } | null;
  recoveredAtMs: number | null;
  drivePeakC: number | null;
  chillers: ChillerTrack[];
}

/** How long a restarted chiller must run with positive lift to count as recovered (assumed: a quarter hour on load). */
export const RECOVERY_HOLD_MS = 15 * 60_000;
/** How long after recovery the drill waits for temporary changes to be put back (assumed). */
export const RECOVERY_GRACE_MS = 30 * 60_000;
/** Pressures inverted by more than this count as crossed (sensor noise on equal shells, assumed). */
export const CROSSED_BY_KPA = 1;

export class DrillTracker {
  private readonly chillers = new Map<string, ChillerTrack>();
  private readonly pressures = new Map<string, { cond?: number; evap?: number }>();
  private readonly faults = new Map<string, string>();
  private readonly pendingStops: Array<{ c: ChillerTrack; tsMs: number }> = [];
  facts: DrillFacts;

  constructor(startedAtMs: number) {
    this.facts = {
      startedAtMs,
      lastMs: startedAtMs,
      crossedAtMs: null,
      failedRestart: null,
      recoveredAtMs: null,
      drivePeakC: null,
      chillers: [],
    };
  }

  private chiller(tag: string): ChillerTrack {
    let c = this.chillers.get(tag);
    if (!c) {
      c = {
        tag,
        everRan: false,
        running: false,
        stopReason: null,
        trippedAtMs: null,
        lastStartMs: null,
        liftKPa: null,
        drivePeakC: null,
        timers: { "start-to-start": { first: null, last: null }, "stop-to-start": { first: null, last: null } },
      };
      this.chillers.set(tag, c);
      this.facts.chillers.push(c);
    }
    return c;
  }

  /** One sample's readings at event time `tsMs`. */
  add(tsMs: number, readings: readonly TrackedReading[]): void {
    this.facts.lastMs = Math.max(this.facts.lastMs, tsMs);
    const touched = new Set<string>();
    for (const r of readings) {
      if (!/^CH-/.test(r.equipment)) continue;
      const c = this.chiller(r.equipment);
      touched.add(r.equipment);
      const p = this.pressures.get(r.equipment) ?? {};
      switch (r.quantity) {
        case "run_status": {
          const on = r.value === true;
          if (on && !c.running) c.lastStartMs = tsMs;
          if (!on && c.running) this.onStop(c, tsMs);
          c.running = on;
          if (on) c.everRan = true;
          break;
        }
        case "chiller_stop_reason":
          c.stopReason = String(r.value);
          break;
        case "fault_text":
          this.faults.set(r.equipment, String(r.value));
          break;
        case "condenser_refrigerant_pressure":
          p.cond = Number(r.value);
          break;
        case "evaporator_refrigerant_pressure":
          p.evap = Number(r.value);
          break;
        case "drive_temp":
          if (c.everRan || c.running) {
            const v = Number(r.value);
            c.drivePeakC = c.drivePeakC === null ? v : Math.max(c.drivePeakC, v);
            this.facts.drivePeakC = this.facts.drivePeakC === null ? v : Math.max(this.facts.drivePeakC, v);
          }
          break;
        case "start_to_start_timer_setting":
        case "stop_to_start_timer_setting": {
          const t = c.timers[r.quantity === "start_to_start_timer_setting" ? "start-to-start" : "stop-to-start"];
          t.first ??= Number(r.value);
          t.last = Number(r.value);
          break;
        }
      }
      this.pressures.set(r.equipment, p);
    }
    for (const tag of touched) {
      const c = this.chiller(tag);
      const p = this.pressures.get(tag)!;
      if (p.cond !== undefined && p.evap !== undefined) c.liftKPa = p.cond - p.evap;
      if (c.everRan && c.liftKPa !== null && c.liftKPa < -CROSSED_BY_KPA && this.facts.crossedAtMs === null)
        this.facts.crossedAtMs = tsMs;
      if (
        this.facts.recoveredAtMs === null &&
        c.trippedAtMs !== null &&
        c.running &&
        c.lastStartMs !== null &&
        c.lastStartMs > c.trippedAtMs &&
        tsMs - c.lastStartMs >= RECOVERY_HOLD_MS &&
        (c.liftKPa ?? 0) > 0
      )
        this.facts.recoveredAtMs = tsMs;
    }
  }

  private onStop(c: ChillerTrack, tsMs: number) {
    // The stop reason arrives in the same sample; read it after this sample's readings are in.
    this.pendingStops.push({ c, tsMs });
  }

  /** Settles stops seen in the last `add` (their stop reason and fault text come in the same sample). */
  settle(): void {
    for (const { c, tsMs } of this.pendingStops.splice(0)) {
      if (c.stopReason === "trip") c.trippedAtMs = tsMs;
      if (
        this.facts.crossedAtMs !== null &&
        this.facts.failedRestart === null &&
        c.lastStartMs !== null &&
        c.lastStartMs >= this.facts.crossedAtMs &&
        (c.stopReason === "trip" || c.stopReason === "safety")
      )
        this.facts.failedRestart = {
          atMs: tsMs,
          chiller: c.tag,
          stopReason: c.stopReason,
          faultText: this.faults.get(c.tag) ?? null,
        };
    }
  }

  /** Timers set below where they started, by chiller and timer (readings of the timer settings). */
  timersShortened(): string[] {
    const out: string[] = [];
    for (const c of this.facts.chillers)
      for (const [name, t] of Object.entries(c.timers))
        if (t.first !== null && t.last !== null && t.last < t.first) out.push(`${c.tag} ${name}`);
    return out;
  }

  /** Feeds one sample and settles it. */
  sample(tsMs: number, readings: readonly TrackedReading[]): void {
    this.add(tsMs, readings);
    this.settle();
  }

  /**
   * Why the drill ends now, or null to go on. `endsAtMs`: the event time its time runs out. `changesOutstanding`:
   * temporary changes (shed air handlers, shortened timers) not yet put back — a recovered plant still waits
   * for them, up to RECOVERY_GRACE_MS, since putting things back is part of the job.
   */
  endReason(endsAtMs: number, changesOutstanding = false): DrillEndReason | null {
    if (this.facts.failedRestart) return "failed_restart";
    const r = this.facts.recoveredAtMs;
    if (r !== null && (!changesOutstanding || this.facts.lastMs - r >= RECOVERY_GRACE_MS)) return "recovery";
    if (this.facts.lastMs >= endsAtMs) return "time";
    return null;
  }
}
