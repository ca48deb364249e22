// Drills on training sites: an admin or senior technician starts one for a trainee; the trainee works the
// simulated plant from the normal screens and the drill panel; each command is recorded with the active
// alarms' advice at that moment; the drill ends on recovery, on a crossover with a failed restart, or on
// time, and is scored from the plant's own points (lib/drills/score.ts).
import crypto from "node:crypto";
import type { Db } from "@/db/client";
import {
  activeAdvice,
  alarmEventsBetween,
  canStartDrills,
  drillPeople,
  finishDrill,
  getSavedScenario,
  insertDrill,
  insertDrillStep,
  insertSavedScenario,
  insertTrainingSite,
  listTrainingSites,
  readingsAt,
  requireDrill,
  runningDrillOf,
} from "@/db/queries/drills";
import { getPointMap } from "@/db/queries/gateways";
import { SERVICE_ORG } from "@/db/seed/demo";
import { addSimulatedPlant } from "@/db/seed/demo";
import { encodeDrillDcmd } from "@/gateway/sparkplug-command";
import { isAdmin, systemViewer, type Viewer } from "@/lib/auth/viewer";
import { describeDrillCommand, timerProblem } from "@/lib/drills/controls";
import { scoreDrill, type DrillStepFact } from "@/lib/drills/score";
import { DrillTracker } from "@/lib/drills/tracker";
import type { DrillDto, TrainingSiteDto } from "@/lib/dto/drills";
import { AppError, notFound } from "@/lib/errors";
import { chillerLimitDefaults } from "@/lib/plant/equipment-limits";
import {
  createTrainingSiteSchema,
  drillCommandBodySchema,
  drillTimerLimits,
  saveScenarioSchema,
  startDrillSchema,
  type DrillCommandBody,
} from "@/lib/schemas/drills";
import { equipmentOf, getLayout, getScenario, type Scenario, type SimEvent } from "@/simulator/index";
import { savedScenarioDefinition, savedScenarioDefinitionSchema, scenarioOfSaved } from "@/simulator/saved-scenario";
import type { SimulationManager } from "./simulation/manager";

const systemAdmin = systemViewer(SERVICE_ORG.id);
/** The wall time the store and the rules get to catch up with a drill's last samples before it is scored. */
const SETTLE_MS = 2000;

export interface DrillLive {
  running: boolean;
  simulatedMs: number | null;
  endsAtMs: number;
  /** The simulator's recent plant events (trips, starts, accepted and refused commands). */
  events: SimEvent[];
  /** The active alarms' advice now: shown when hints are on (and always to whoever started the drill). */
  advice: Array<{ equipment: string; title: string; advice: string[] }> | null;
  equipment: { chillers: string[]; airHandlers: string[]; tower: string };
}

export interface DrillService {
  createTrainingSite(viewer: Viewer, body: unknown): Promise<TrainingSiteDto>;
  start(viewer: Viewer, body: unknown): Promise<DrillDto>;
  command(viewer: Viewer, drillId: string, body: unknown): Promise<{ text: string; atMs: number }>;
  stop(viewer: Viewer, drillId: string): Promise<void>;
  live(viewer: Viewer, drillId: string): DrillLive | null;
  runningOn(siteId: string): string | null;
  saveScenario(viewer: Viewer, body: unknown): { id: string; approximated: string[] };
  close(): Promise<void>;
}

interface Active {
  id: string;
  siteId: string;
  layout: string;
  traineeId: string;
  startedBy: string;
  hints: boolean;
  tracker: DrillTracker;
  startedAtMs: number;
  endsAtMs: number;
  simulatedMs: number | null;
  events: SimEvent[];
  commands: DrillStepFact[];
  ending: Promise<void> | null;
}

export function createDrillService(deps: {
  db: Db;
  simulation: SimulationManager;
  sendJsonCommand(gatewayId: string, payload: unknown): Promise<void>;
  publishCommand(topic: string, payload: Buffer): void;
  log: (line: string) => void;
  now?: () => number;
}): DrillService {
  const { db, simulation, log } = deps;
  const now = deps.now ?? Date.now;
  const active = new Map<string, Active>();

  const siteLayout = (siteId: string) => listTrainingSites(db, systemAdmin).find((s) => s.id === siteId);

  function scenarioFor(name: string): Scenario {
    if (!name.startsWith("saved:")) return getScenario(name);
    const saved = getSavedScenario(db, name.slice("saved:".length));
    if (!saved) throw new AppError("bad_request", "No such saved scenario.");
    return scenarioOfSaved(saved.id, saved.name, savedScenarioDefinitionSchema.parse(saved.definition));
  }

  async function end(a: Active, reason: "recovery" | "failed_restart" | "time" | "stopped", actor: Viewer) {
    if (a.ending) return a.ending;
    a.ending = (async () => {
      await simulation.stop(a.siteId).catch(() => {});
      // Let the writer commit the last samples and the rules evaluate them before the alarms are read.
      await new Promise((r) => setTimeout(r, SETTLE_MS));
      const endedAtMs = Math.max(a.tracker.facts.lastMs, a.simulatedMs ?? a.startedAtMs);
      const alarmEvents = alarmEventsBetween(db, a.siteId, a.startedAtMs, endedAtMs);
      const firstWarning = alarmEvents.find((e) => e.cause === "condition_active");
      const layout = getLayout(a.layout)!;
      const driveTripC = chillerLimitDefaults(layout.chillers[0].refrigerant, "centrifugal_vsd_oil_free").driveTempTripC
        .value;
      // Acknowledgements and notes the trainee made through the normal alarm screens join the steps.
      const people = alarmEvents.filter((e) => e.actorName !== null && e.cause !== "condition_active");
      const score = scoreDrill({
        facts: a.tracker.facts,
        endReason: reason,
        firstWarningMs: firstWarning?.atMs ?? null,
        steps: a.commands,
        driveTripC,
        timerDefaults: {
          "start-to-start": drillTimerLimits["start-to-start"].default,
          "stop-to-start": drillTimerLimits["stop-to-start"].default,
        },
      });
      finishDrill(
        db,
        actor,
        a.id,
        {
          outcome: score.outcome,
          endedAtMs,
          score: { ...score, facts: a.tracker.facts, events: a.events.slice(-300), driveTripC },
          scorePct: score.pct,
        },
        people.map((e) => ({
          atMs: e.atMs,
          userId: null,
          kind: e.cause === "acknowledged" ? "ack" : "note",
          detail: { text: `${e.actorName}: ${e.cause} ${e.equipment} — ${e.title}${e.note ? ` (“${e.note}”)` : ""}` },
        })),
      );
      active.delete(a.id);
      log(`[drill] ${a.id} ended: ${reason}, ${score.outcome}, ${score.pct} %`);
    })();
    return a.ending;
  }

  /** Air handlers the trainee shed and has not restored, or timers still shortened. */
  function outstanding(a: Active): boolean {
    const ahu = new Map<string, boolean>();
    for (const c of a.commands)
      if (c.action?.type === "set-air-handler") ahu.set(c.action.equipment, c.action.run === true);
    return [...ahu.values()].some((run) => !run) || a.tracker.timersShortened().length > 0;
  }

  function requireActive(drillId: string): Active {
    const a = active.get(drillId);
    if (!a) throw new AppError("conflict", "This drill is not running.");
    return a;
  }

  return {
    async createTrainingSite(viewer, body) {
      if (!isAdmin(viewer)) throw new AppError("forbidden", "Only an admin may add a training site.");
      const input = createTrainingSiteSchema.parse(body);
      const id = `training-${crypto.randomBytes(4).toString("hex")}`;
      insertTrainingSite(db, viewer, { id, name: input.name, timeZone: "America/Chicago", layout: input.layout });
      addSimulatedPlant(db, viewer, id, input.layout);
      const ref = await simulation.addTrainingSite({
        id,
        name: input.name,
        layout: input.layout,
        protocol: input.protocol,
      });
      return { id, name: input.name, layout: input.layout, protocol: ref.protocol, gatewayId: ref.gatewayId };
    },

    async start(viewer, body) {
      if (!canStartDrills(viewer))
        throw new AppError("forbidden", "Only an admin or a senior technician may start a drill.");
      const input = startDrillSchema.parse(body);
      const site = siteLayout(input.siteId);
      if (!site) throw notFound("No such training site.");
      if (!drillPeople(db, viewer).some((p) => p.id === input.traineeId))
        throw new AppError("bad_request", "The trainee must be an active admin or technician.");
      if (runningDrillOf(db, site.id)) throw new AppError("conflict", "A drill is already running on this site.");
      const scenario = scenarioFor(input.scenario);
      const id = `drill-${crypto.randomBytes(6).toString("hex")}`;
      const seed = input.seed ?? 7;
      const durationS = scenario.defaultDurationS;
      // The manager starts the run this far in the past so the fast run reaches "now" as it ends.
      const startedAtMs = Math.floor(now() - durationS * 1000 * (1 - 1 / input.speed));
      const a: Active = {
        id,
        siteId: site.id,
        layout: site.layout,
        traineeId: input.traineeId,
        startedBy: viewer.userId,
        hints: input.hints,
        tracker: new DrillTracker(startedAtMs),
        startedAtMs,
        // A few seconds' slack: the manager reads the clock again when it starts the run.
        endsAtMs: startedAtMs + durationS * 1000 - 5000,
        simulatedMs: null,
        events: [],
        commands: [],
        ending: null,
      };
      insertDrill(db, viewer, {
        id,
        siteId: site.id,
        traineeId: input.traineeId,
        scenario: input.scenario,
        speed: input.speed,
        seed,
        hints: input.hints,
        startedAtMs,
      });
      active.set(id, a);
      const status = await simulation.start(site.id, scenario, input.speed, seed, undefined, {
        loop: false,
        // At 600× a reading every simulated 10 s is 60 samples of the whole plant per wall second, more than the
        // rules and the store need to follow a drill; one a simulated minute keeps the server responsive.
        sampleEveryS: Math.max(10, input.speed / 10),
        onSample: (s) => {
          if (a.ending) return;
          a.simulatedMs = s.tsMs;
          a.tracker.sample(s.tsMs, s.readings);
          const reason = a.tracker.endReason(a.endsAtMs, outstanding(a));
          if (reason) void end(a, reason, systemAdmin);
        },
        onEvent: (e) => {
          a.events.push(e);
          if (a.events.length > 1000) a.events.shift();
        },
      });
      // The manager may have moved the start by rounding; follow the run's own clock.
      if (status.run) a.simulatedMs = status.run.simulatedMs;
      return requireDrill(db, viewer, id);
    },

    async command(viewer, drillId, body) {
      if (viewer.role !== "admin" && viewer.role !== "technician") throw notFound("No such drill.");
      const a = requireActive(drillId);
      const drill = { siteId: a.siteId };
      if (viewer.userId !== a.traineeId && viewer.userId !== a.startedBy && !isAdmin(viewer))
        throw new AppError("forbidden", "Only the trainee or whoever started the drill may act in it.");
      const action: DrillCommandBody = drillCommandBodySchema.parse(body);
      const problem = timerProblem(action);
      if (problem) throw new AppError("bad_request", problem);
      const ref = simulation.gatewayOf(drill.siteId);
      if (!ref) throw new AppError("unavailable", "The training site's simulated gateway is not running.");
      const atMs = a.simulatedMs ?? a.startedAtMs;
      const advice = activeAdvice(db, drill.siteId);
      const text = describeDrillCommand(action);
      // Sent before it is recorded: at 600× every wall second the command waits is ten simulated minutes.
      if (ref.protocol === "sparkplug") {
        const map = getPointMap(db, systemAdmin, ref.gatewayId);
        const { topic, payload } = encodeDrillDcmd(
          { groupId: ref.groupId!, edgeNodeId: ref.edgeNodeId! },
          action,
          map,
          now(),
        );
        deps.publishCommand(topic, payload);
      } else await deps.sendJsonCommand(ref.gatewayId, { id: `${drillId}-${a.commands.length + 1}`, action });
      a.commands.push({ atMs, kind: "command", action });
      insertDrillStep(db, viewer, {
        drillId,
        siteId: drill.siteId,
        atMs,
        kind: "command",
        detail: { text, action, via: ref.protocol === "sparkplug" ? "Sparkplug DCMD" : "command topic" },
        adviceAtTime: advice,
      });
      return { text, atMs };
    },

    async stop(viewer, drillId) {
      const a = requireActive(drillId);
      if (viewer.userId !== a.startedBy && !isAdmin(viewer) && viewer.userId !== a.traineeId)
        throw new AppError("forbidden", "Only the trainee or whoever started the drill may stop it.");
      await end(a, "stopped", viewer);
    },

    live(viewer, drillId) {
      const a = active.get(drillId);
      const layout = a ? getLayout(a.layout) : undefined;
      if (!a || !layout) return null;
      const eq = equipmentOf(layout);
      const showAdvice = a.hints || viewer.userId !== a.traineeId;
      return {
        running: !a.ending,
        simulatedMs: a.simulatedMs,
        endsAtMs: a.endsAtMs,
        events: a.events.slice(-200),
        advice: showAdvice ? activeAdvice(db, a.siteId) : null,
        equipment: {
          chillers: eq.filter((e) => e.kind === "chiller").map((e) => e.tag),
          airHandlers: eq.filter((e) => e.kind === "air_handler").map((e) => e.tag),
          tower: "CT-1",
        },
      };
    },

    runningOn(siteId) {
      for (const a of active.values()) if (a.siteId === siteId && !a.ending) return a.id;
      return null;
    },

    saveScenario(viewer, body) {
      if (!canStartDrills(viewer))
        throw new AppError("forbidden", "Only an admin or a senior technician may save a drill starting point.");
      const input = saveScenarioSchema.parse(body);
      // The layout whose equipment the site has: a training site's is known; a real site maps to the
      // default layout's model, sized by its own chiller count where a layout matches.
      const training = siteLayout(input.siteId);
      const layoutName = training?.layout ?? "default";
      const layout = getLayout(layoutName)!;
      const stored = readingsAt(db, viewer, input.siteId, input.atMs);
      if (stored.length === 0)
        throw new AppError("bad_request", "No stored readings within 15 minutes before that time.");
      const definition = savedScenarioDefinition(input.base, layoutName, layout, input.atMs, stored);
      const id = crypto.randomBytes(6).toString("hex");
      insertSavedScenario(db, viewer, {
        id,
        name: input.name,
        fromIncidentId: input.fromIncidentId,
        definition,
        siteId: input.siteId,
      });
      return { id, approximated: definition.approximated };
    },

    async close() {
      for (const a of active.values()) await simulation.stop(a.siteId).catch(() => {});
    },
  };
}
