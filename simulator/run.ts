// Running a scenario: warm the plant up to steady operation, then step it through the scenario's
// script and yield sampled readings and events.
import { defaultLayout, type SiteLayout } from "./layout";
import { initialState, step } from "./plant";
import { Rng, seedState } from "./prng";
import { plantReadings, type CanonicalReading } from "./readings";
import { getScenario, type Scenario } from "./scenarios";
import type { DrillAction } from "./actions-schema";
import type { ModelEvent, PlantCommand, PlantState, StepInputs } from "./state";

export interface SimEvent {
  tsMs: number;
  kind: ModelEvent["kind"];
  equipment: string | null;
  message: string;
}

export interface RunSample {
  tsMs: number;
  readings: CanonicalReading[];
  events: SimEvent[];
}

export interface RunScenarioOptions {
  /** A catalogue name, or a scenario object (a starting point saved from stored readings, `saved-scenario.ts`). */
  scenario: string | Scenario;
  seed: number;
  startMs: number;
  durationS: number;
  stepS?: number;
  sampleEveryS?: number;
  layout?: SiteLayout;
  actions?: Array<{ atS: number; action: DrillAction }>;
}

/** Warm-up: an hour at the scenario's starting conditions so the loops start settled (assumed long enough). */
const warmUpS = 3600;
const warmUpStepS = 5;

function inputsAt(sc: Scenario, layout: SiteLayout, tS: number, commands: PlantCommand[]): StepInputs {
  return { ...sc.conditions(tS, layout), commands };
}

/** A plant brought to steady operation at the scenario's time-0 conditions, at tS = 0 with empty logs. */
export function warmedUpState(sc: Scenario, layout: SiteLayout, seed: number): PlantState {
  const init = sc.initial(layout);
  let s = initialState(layout, seed, inputsAt(sc, layout, 0, []), init);
  for (let t = 0; t < warmUpS; t += warmUpStepS) {
    s = step(s, inputsAt(sc, layout, 0, []), warmUpStepS).state;
  }
  // Restart the clock at zero; no starts or stops inside the anti-recycle windows; clean logs.
  const shift = s.tS;
  return {
    ...s,
    tS: 0,
    weatherNextS: 0,
    rng: seedState(seed + 1),
    powerDownUntilS: -1,
    faultLog: [],
    chillers: s.chillers.map((c) => ({
      ...c,
      lastStartS: c.lastStartS - shift - 3600,
      lastStopS: c.lastStopS - shift - 3600,
      driveFaultUntilS: -1,
    })),
  };
}

/** A scheduled command with its time, scenario events first at equal times (stable order). */
interface Timed {
  atS: number;
  command: PlantCommand;
}

/**
 * A scenario being played step by step. Drill actions can be queued at any time (the gateway client
 * feeds them from the command topic); `advanceTo` steps the model and returns the samples due.
 */
export class PlantRunner {
  readonly layout: SiteLayout;
  readonly scenario: Scenario;
  readonly stepS: number;
  readonly sampleEveryS: number;
  readonly startMs: number;
  state: PlantState;
  private timed: Timed[];
  private nextTimed = 0;
  private nextSampleS = 0;
  private pending: SimEvent[] = [];
  private sensorRng: Rng;

  constructor(opts: Omit<RunScenarioOptions, "durationS">) {
    this.layout = opts.layout ?? defaultLayout;
    this.scenario = typeof opts.scenario === "string" ? getScenario(opts.scenario) : opts.scenario;
    this.stepS = opts.stepS ?? 1;
    this.sampleEveryS = opts.sampleEveryS ?? 10;
    this.startMs = opts.startMs;
    this.timed = [
      ...this.scenario.script(this.layout).map((e) => ({ atS: e.atS, command: e.command })),
      ...(opts.actions ?? []).map((a) => ({
        atS: a.atS,
        command: { kind: "drill", action: a.action, source: "operator" } as PlantCommand,
      })),
    ].sort((a, b) => a.atS - b.atS);
    this.sensorRng = new Rng(seedState(opts.seed * 7919 + 13));
    this.state = warmedUpState(this.scenario, this.layout, opts.seed);
  }

  get tS(): number {
    return this.state.tS;
  }

  /** Queue an operator drill action at simulated second `atS` (default: the next step). */
  pushAction(action: DrillAction, atS = this.state.tS): void {
    const entry = { atS, command: { kind: "drill", action, source: "operator" } as PlantCommand };
    let i = this.nextTimed;
    while (i < this.timed.length && this.timed[i].atS <= atS) i++;
    this.timed.splice(i, 0, entry);
  }

  private toSim(e: ModelEvent): SimEvent {
    return { tsMs: this.startMs + Math.round(e.tS * 1000), kind: e.kind, equipment: e.equipment, message: e.message };
  }

  /** Step up to scenario second `untilS`; returns each sample (readings + events since the last one) on the way. */
  advanceTo(untilS: number, onSample: (s: RunSample & { state: PlantState }) => void): void {
    for (;;) {
      const tS = this.state.tS;
      if (tS >= this.nextSampleS - 1e-9) {
        const tsMs = this.startMs + Math.round(tS * 1000);
        onSample({
          tsMs,
          readings: plantReadings(this.state, tsMs, this.sensorRng),
          events: this.pending,
          state: this.state,
        });
        this.pending = [];
        this.nextSampleS += this.sampleEveryS;
      }
      const dt = Math.min(this.stepS, untilS - tS);
      if (dt <= 1e-9) return;
      const commands: PlantCommand[] = [];
      while (this.nextTimed < this.timed.length && this.timed[this.nextTimed].atS < tS + dt - 1e-9)
        commands.push(this.timed[this.nextTimed++].command);
      const r = step(this.state, inputsAt(this.scenario, this.layout, tS, commands), dt);
      this.state = r.state;
      for (const e of r.events) this.pending.push(this.toSim(e));
    }
  }

  /** Events not yet handed out with a sample. */
  flushEvents(): SimEvent[] {
    const out = this.pending;
    this.pending = [];
    return out;
  }
}

export function* runPlant(opts: RunScenarioOptions): Generator<RunSample & { state: PlantState }> {
  const runner = new PlantRunner(opts);
  const chunkS = Math.max(runner.sampleEveryS, 60);
  const buffer: Array<RunSample & { state: PlantState }> = [];
  while (runner.tS < opts.durationS - 1e-9) {
    runner.advanceTo(Math.min(opts.durationS, runner.tS + chunkS), (s) => buffer.push(s));
    yield* buffer.splice(0);
  }
  // The sample at the end time itself, and any events after the last sample.
  runner.advanceTo(opts.durationS, (s) => buffer.push(s));
  yield* buffer.splice(0);
  const rest = runner.flushEvents();
  if (rest.length > 0)
    yield { tsMs: runner.startMs + Math.round(runner.tS * 1000), readings: [], events: rest, state: runner.state };
}

/** The contract other modules code against: canonical SI readings by equipment tag and quantity key. */
export function* runScenario(opts: RunScenarioOptions): Iterable<RunSample> {
  for (const s of runPlant(opts)) yield { tsMs: s.tsMs, readings: s.readings, events: s.events };
}
