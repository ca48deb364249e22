import "server-only";
import { and, asc, desc, eq, gte, inArray, isNull, lte } from "drizzle-orm";
import { alias } from "drizzle-orm/sqlite-core";
import type { Db } from "../client";
import {
  alarmEvents,
  alarms,
  drills,
  drillSteps,
  equipment,
  gateways,
  points,
  readings,
  savedScenarios,
  sites,
  users,
} from "../schema";
import { canAct, isAdmin, type Viewer } from "@/lib/auth/viewer";
import { AppError, notFound } from "@/lib/errors";
import { quantities, type QuantityKey } from "@/lib/quantities";
import type {
  DrillAlarmEventDto,
  DrillDto,
  DrillPersonDto,
  DrillStepDto,
  DrillWithStepsDto,
  SavedScenarioDto,
  TrainingSiteDto,
} from "@/lib/dto/drills";
import { writeAudit } from "./audit";

// Training sites, drills and their steps, saved starting points. Only the service company's staff
// see any of it: a customer's viewer matches nothing here (404), whatever the route asks.

const staff = (viewer: Viewer) => viewer.role === "admin" || viewer.role === "technician";

/** The simulated gateway of a training site is named after its layout (`Training plant gateway · school`). */
export const TRAINING_GATEWAY_PREFIX = "Training plant gateway · ";

export function isTrainingSite(db: Db, siteId: string): boolean {
  return db.select({ t: sites.training }).from(sites).where(eq(sites.id, siteId)).get()?.t === true;
}

export function insertTrainingSite(
  db: Db,
  viewer: Viewer,
  input: { id: string; name: string; timeZone: string; layout: string },
): void {
  if (!isAdmin(viewer)) throw new AppError("forbidden", "Only an admin may add a training site.");
  db.transaction(
    (tx) => {
      tx.insert(sites)
        .values({
          id: input.id,
          name: input.name,
          // The service company's own site: no customer's viewer ever matches it.
          organizationId: viewer.organizationId,
          kind: "training",
          address: `Simulated plant (${input.layout} layout) — training only`,
          timeZone: input.timeZone,
          training: true,
        })
        .run();
      writeAudit(tx, viewer, {
        action: "create",
        entityType: "site",
        entityId: input.id,
        siteId: input.id,
        summary: `Added training site ${input.name} (${input.layout} layout)`,
        after: { name: input.name, layout: input.layout, training: true },
      });
    },
    { behavior: "immediate" },
  );
}

export function listTrainingSites(db: Db, viewer: Viewer): TrainingSiteDto[] {
  if (!staff(viewer)) return [];
  const rows = db
    .select({
      id: sites.id,
      name: sites.name,
      gatewayId: gateways.id,
      gatewayName: gateways.name,
      protocol: gateways.protocol,
    })
    .from(sites)
    .leftJoin(gateways, and(eq(gateways.siteId, sites.id), isNull(gateways.revokedAt)))
    .where(and(eq(sites.training, true), isNull(sites.retiredAt)))
    .orderBy(asc(sites.name))
    .all();
  const out = new Map<string, TrainingSiteDto>();
  for (const r of rows) {
    if (!r.gatewayName?.startsWith(TRAINING_GATEWAY_PREFIX)) {
      if (!out.has(r.id))
        out.set(r.id, { id: r.id, name: r.name, layout: "default", protocol: "json", gatewayId: null });
      continue;
    }
    out.set(r.id, {
      id: r.id,
      name: r.name,
      layout: r.gatewayName.slice(TRAINING_GATEWAY_PREFIX.length),
      protocol: r.protocol === "sparkplug" ? "sparkplug" : "json",
      gatewayId: r.gatewayId,
    });
  }
  return [...out.values()];
}

/** Admins and technicians who may be a drill's trainee. */
export function drillPeople(db: Db, viewer: Viewer): DrillPersonDto[] {
  if (!staff(viewer)) return [];
  return db
    .select({ id: users.id, name: users.name, role: users.role })
    .from(users)
    .where(and(inArray(users.role, ["admin", "technician"]), eq(users.disabled, false)))
    .orderBy(asc(users.name))
    .all() as DrillPersonDto[];
}

export function runningDrillOf(db: Db, siteId: string): { id: string } | undefined {
  return db
    .select({ id: drills.id })
    .from(drills)
    .where(and(eq(drills.siteId, siteId), eq(drills.state, "running")))
    .get();
}

export function insertDrill(
  db: Db,
  viewer: Viewer,
  row: {
    id: string;
    siteId: string;
    traineeId: string;
    scenario: string;
    speed: number;
    seed: number;
    hints: boolean;
    startedAtMs: number;
  },
): void {
  db.transaction(
    (tx) => {
      tx.insert(drills)
        .values({ ...row, startedBy: viewer.userId, state: "running" })
        .run();
      writeAudit(tx, viewer, {
        action: "create",
        entityType: "drill",
        entityId: row.id,
        siteId: row.siteId,
        summary: `Started a ${row.scenario} drill at ${row.speed}× for ${row.traineeId}`,
        after: { scenario: row.scenario, speed: row.speed, hints: row.hints, traineeId: row.traineeId },
      });
    },
    { behavior: "immediate" },
  );
}

export function finishDrill(
  db: Db,
  viewer: Viewer,
  drillId: string,
  end: { outcome: DrillDto["outcome"]; endedAtMs: number; score: unknown; scorePct: number | null },
  steps: ReadonlyArray<{ atMs: number; userId: string | null; kind: string; detail: unknown }>,
): boolean {
  return db.transaction(
    (tx) => {
      const r = tx
        .update(drills)
        .set({
          state: "ended",
          outcome: end.outcome,
          endedAtMs: end.endedAtMs,
          score: end.score,
          scorePct: end.scorePct,
        })
        .where(and(eq(drills.id, drillId), eq(drills.state, "running")))
        .run();
      if (r.changes === 0) return false;
      for (const s of steps)
        tx.insert(drillSteps)
          .values({ drillId, ...s, adviceAtTime: null })
          .run();
      writeAudit(tx, viewer, {
        action: "update",
        entityType: "drill",
        entityId: drillId,
        summary: `Drill ended: ${end.outcome} (${end.scorePct ?? "—"} %)`,
        after: { outcome: end.outcome, scorePct: end.scorePct },
      });
      return true;
    },
    { behavior: "immediate" },
  );
}

export function insertDrillStep(
  db: Db,
  viewer: Viewer,
  step: { drillId: string; siteId: string; atMs: number; kind: string; detail: unknown; adviceAtTime: unknown },
): void {
  db.transaction(
    (tx) => {
      const { siteId, ...row } = step;
      tx.insert(drillSteps)
        .values({ ...row, userId: viewer.userId === "system" ? null : viewer.userId })
        .run();
      writeAudit(tx, viewer, {
        action: "update",
        entityType: "drill",
        entityId: step.drillId,
        siteId,
        summary: `Drill step: ${(step.detail as { text?: string }).text ?? step.kind}`,
        after: step.detail,
      });
    },
    { behavior: "immediate" },
  );
}

const trainee = alias(users, "trainee");
const starter = alias(users, "starter");

const drillColumns = {
  id: drills.id,
  siteId: drills.siteId,
  siteName: sites.name,
  siteTimeZone: sites.timeZone,
  traineeId: drills.traineeId,
  traineeName: trainee.name,
  startedById: drills.startedBy,
  startedByName: starter.name,
  scenario: drills.scenario,
  speed: drills.speed,
  seed: drills.seed,
  hints: drills.hints,
  state: drills.state,
  outcome: drills.outcome,
  startedAtMs: drills.startedAtMs,
  endedAtMs: drills.endedAtMs,
  score: drills.score,
  scorePct: drills.scorePct,
  createdAt: drills.createdAt,
};

function drillQuery(db: Db) {
  return db
    .select(drillColumns)
    .from(drills)
    .innerJoin(sites, eq(sites.id, drills.siteId))
    .innerJoin(trainee, eq(trainee.id, drills.traineeId))
    .innerJoin(starter, eq(starter.id, drills.startedBy));
}

type DrillRow = Omit<DrillDto, "createdAt" | "score"> & { createdAt: Date; score: unknown };
const toDto = (r: DrillRow): DrillDto => ({
  ...r,
  score: (r.score as DrillDto["score"]) ?? null,
  createdAt: r.createdAt.toISOString(),
});

export function listDrills(db: Db, viewer: Viewer, filter: { traineeId?: string } = {}): DrillDto[] {
  if (!staff(viewer)) return [];
  return drillQuery(db)
    .where(filter.traineeId ? eq(drills.traineeId, filter.traineeId) : undefined)
    .orderBy(desc(drills.createdAt))
    .limit(500)
    .all()
    .map((r) => toDto(r as DrillRow));
}

export function getDrill(db: Db, viewer: Viewer, drillId: string): DrillWithStepsDto | null {
  if (!staff(viewer)) return null;
  const row = drillQuery(db).where(eq(drills.id, drillId)).get();
  if (!row) return null;
  const steps = db
    .select({
      id: drillSteps.id,
      atMs: drillSteps.atMs,
      userName: users.name,
      kind: drillSteps.kind,
      detail: drillSteps.detail,
      advice: drillSteps.adviceAtTime,
    })
    .from(drillSteps)
    .leftJoin(users, eq(users.id, drillSteps.userId))
    .where(eq(drillSteps.drillId, drillId))
    .orderBy(asc(drillSteps.atMs), asc(drillSteps.id))
    .all() as DrillStepDto[];
  return { ...toDto(row as DrillRow), steps };
}

export function requireDrill(db: Db, viewer: Viewer, drillId: string): DrillWithStepsDto {
  const d = getDrill(db, viewer, drillId);
  if (!d) throw notFound("No such drill.");
  return d;
}

/** The site's alarm transitions in an event-time window, with who acted and their notes. */
export function alarmEventsBetween(db: Db, siteId: string, fromMs: number, toMs: number): DrillAlarmEventDto[] {
  const actor = alias(users, "actor");
  return db
    .select({
      atMs: alarmEvents.eventAtMs,
      equipment: alarms.equipment,
      ruleId: alarms.ruleId,
      detailJson: alarms.detailJson,
      from: alarmEvents.fromState,
      to: alarmEvents.toState,
      cause: alarmEvents.cause,
      actorId: alarmEvents.actorUserId,
      actorName: actor.name,
      note: alarmEvents.note,
    })
    .from(alarmEvents)
    .innerJoin(alarms, eq(alarms.id, alarmEvents.alarmId))
    .leftJoin(actor, eq(actor.id, alarmEvents.actorUserId))
    .where(and(eq(alarmEvents.siteId, siteId), gte(alarmEvents.eventAtMs, fromMs), lte(alarmEvents.eventAtMs, toMs)))
    .orderBy(asc(alarmEvents.eventAtMs), asc(alarmEvents.id))
    .all()
    .map(({ detailJson, actorId: _a, ...r }) => ({
      ...r,
      title: (JSON.parse(detailJson) as { technicianMessage?: string }).technicianMessage ?? r.ruleId,
    }));
}

/** The active alarms' advice on a site now (what the rules say at this moment). */
export function activeAdvice(db: Db, siteId: string): Array<{ equipment: string; title: string; advice: string[] }> {
  return db
    .select({ equipment: alarms.equipment, ruleId: alarms.ruleId, detailJson: alarms.detailJson })
    .from(alarms)
    .where(and(eq(alarms.siteId, siteId), eq(alarms.conditionActive, true)))
    .orderBy(asc(alarms.priority), asc(alarms.equipment))
    .all()
    .map((a) => {
      const d = JSON.parse(a.detailJson) as { technicianMessage?: string; advice?: string[] };
      return { equipment: a.equipment, title: d.technicianMessage ?? a.ruleId, advice: d.advice ?? [] };
    })
    .filter((a) => a.advice.length > 0);
}

/** Each point's latest stored value at or before `atMs` (within `lookBackMs`), canonical SI. */
export function readingsAt(
  db: Db,
  viewer: Viewer,
  siteId: string,
  atMs: number,
  lookBackMs = 15 * 60_000,
): Array<{ equipment: string; quantity: string; value: number | boolean | string }> {
  if (!staff(viewer)) throw notFound("No such site.");
  const pts = db
    .select({ id: points.id, tag: equipment.tag, quantity: points.quantity })
    .from(points)
    .innerJoin(equipment, eq(equipment.id, points.equipmentId))
    .where(eq(equipment.siteId, siteId))
    .all();
  const out: Array<{ equipment: string; quantity: string; value: number | boolean | string }> = [];
  for (const p of pts) {
    const r = db
      .select({ value: readings.value, text: readings.text })
      .from(readings)
      .where(and(eq(readings.pointId, p.id), lte(readings.ts, atMs), gte(readings.ts, atMs - lookBackMs)))
      .orderBy(desc(readings.ts))
      .limit(1)
      .get();
    if (!r) continue;
    const measure = quantities[p.quantity as QuantityKey]?.measure;
    const value = measure === "boolean" ? r.value !== 0 : measure === "state" || measure === "text" ? r.text : r.value;
    if (value !== null && value !== undefined) out.push({ equipment: p.tag, quantity: p.quantity, value });
  }
  return out;
}

export function insertSavedScenario(
  db: Db,
  viewer: Viewer,
  row: { id: string; name: string; fromIncidentId?: string; definition: unknown; siteId: string },
): void {
  db.transaction(
    (tx) => {
      const { siteId, ...values } = row;
      tx.insert(savedScenarios)
        .values({ ...values, fromIncidentId: values.fromIncidentId ?? null, createdBy: viewer.userId })
        .run();
      writeAudit(tx, viewer, {
        action: "create",
        entityType: "drill",
        entityId: row.id,
        siteId,
        summary: `Saved drill starting point ${row.name}`,
        after: row.definition,
      });
    },
    { behavior: "immediate" },
  );
}

export function getSavedScenario(db: Db, id: string): { id: string; name: string; definition: unknown } | undefined {
  return db
    .select({ id: savedScenarios.id, name: savedScenarios.name, definition: savedScenarios.definition })
    .from(savedScenarios)
    .where(eq(savedScenarios.id, id))
    .get();
}

export function listSavedScenarios(db: Db, viewer: Viewer): SavedScenarioDto[] {
  if (!staff(viewer)) return [];
  return db
    .select({
      id: savedScenarios.id,
      name: savedScenarios.name,
      definition: savedScenarios.definition,
      createdAt: savedScenarios.createdAt,
    })
    .from(savedScenarios)
    .orderBy(desc(savedScenarios.createdAt))
    .all()
    .map((r) => {
      const d = r.definition as { base: string; layout: string; atMs: number; approximated: string[] };
      return {
        id: r.id,
        name: r.name,
        base: d.base,
        layout: d.layout,
        atMs: d.atMs,
        approximated: d.approximated,
        createdAt: r.createdAt.toISOString(),
      };
    });
}

/** The sites whose alarms never notify anyone (training sites), for the notification paths. */
export function trainingSiteIds(db: Db): Set<string> {
  return new Set(
    db
      .select({ id: sites.id })
      .from(sites)
      .where(eq(sites.training, true))
      .all()
      .map((r) => r.id),
  );
}

/**
 * Who may start a drill: admins always; a technician (there is no seniority on record, so any technician
 * with acting rights counts as the senior one) for another person or themselves.
 */
export const canStartDrills = (viewer: Viewer): boolean =>
  isAdmin(viewer) || (viewer.role === "technician" && canAct(viewer));

/** Stored readings of a few points in an event-time window (canonical SI), for the debrief's trends. */
export function drillSeries(
  db: Db,
  siteId: string,
  fromMs: number,
  toMs: number,
  wanted: ReadonlyArray<{ tag: string; quantity: string }>,
): Array<{ tag: string; quantity: string; xs: number[]; ys: number[] }> {
  return wanted.map(({ tag, quantity }) => {
    const p = db
      .select({ id: points.id })
      .from(points)
      .innerJoin(equipment, eq(equipment.id, points.equipmentId))
      .where(and(eq(equipment.siteId, siteId), eq(equipment.tag, tag), eq(points.quantity, quantity)))
      .get();
    const rows = p
      ? db
          .select({ ts: readings.ts, value: readings.value })
          .from(readings)
          .where(and(eq(readings.pointId, p.id), gte(readings.ts, fromMs), lte(readings.ts, toMs)))
          .orderBy(asc(readings.ts))
          .all()
      : [];
    const numeric = rows.filter((r): r is { ts: number; value: number } => typeof r.value === "number");
    return { tag, quantity, xs: numeric.map((r) => r.ts), ys: numeric.map((r) => r.value) };
  });
}
