import "server-only";
import { randomUUID } from "node:crypto";
import { and, asc, desc, eq, gte, inArray, isNotNull, isNull, lte, sql, type SQL } from "drizzle-orm";
import type { Db } from "../client";
import {
  alarmEvents,
  alarmNotes,
  alarms,
  drills,
  equipment,
  incidentAlarms,
  incidents,
  latestValues,
  points,
  sites,
  temporaryChanges,
  users,
  visitEntries,
  visits,
} from "../schema";
import { writeAudit } from "./audit";
import { canAct, seesAllSites, type Viewer } from "@/lib/auth/viewer";
import { AppError, notFound } from "@/lib/errors";
import {
  automaticTitle,
  incidentEndMs,
  incidentFor,
  mergedSpan,
  rootHintOf,
  spanOf,
  splitMembers,
  type ActivationRef,
  type GroupableIncident,
  type MemberActivation,
} from "@/lib/incidents/grouping";
import type { IncidentDto, IncidentMemberDto, IncidentState, IncidentSummaryDto } from "@/lib/dto/incidents";
import type { TimelineEntry } from "@/lib/incidents/timeline";

// Incidents: alarm activations of a site grouped by lib/incidents/grouping.ts, with the team's
// name, state, cause and lesson and the customer's plain-language version. Staff read every site's;
// a customer reads only their own organization's incidents once shared, never a training site's.

/** The event time an activation returned to normal: its alarm's first clear (or reset of a simulated timeline) after it began. */
const clearedAtSql = sql<number | null>`(select min(${alarmEvents.eventAtMs}) from ${alarmEvents}
  where ${alarmEvents.alarmId} = ${incidentAlarms.alarmId}
    and ${alarmEvents.eventAtMs} >= ${incidentAlarms.activeSinceMs}
    and ${alarmEvents.cause} in ('condition_cleared', 'simulation_restarted'))`;

function membersOf(db: Pick<Db, "select">, incidentIds: readonly string[]): Map<string, IncidentMemberDto[]> {
  const out = new Map<string, IncidentMemberDto[]>();
  if (!incidentIds.length) return out;
  const rows = db
    .select({
      incidentId: incidentAlarms.incidentId,
      alarmId: incidentAlarms.alarmId,
      activeSinceMs: incidentAlarms.activeSinceMs,
      clearedAtMs: clearedAtSql,
      ruleId: alarms.ruleId,
      equipment: alarms.equipment,
      priority: alarms.priority,
    })
    .from(incidentAlarms)
    .innerJoin(alarms, eq(alarms.id, incidentAlarms.alarmId))
    .where(inArray(incidentAlarms.incidentId, [...incidentIds]))
    .orderBy(asc(incidentAlarms.activeSinceMs))
    .all();
  for (const { incidentId, ...m } of rows) {
    const list = out.get(incidentId) ?? [];
    list.push(m);
    out.set(incidentId, list);
  }
  return out;
}

// ---------------------------------------------------------------- automatic grouping (the server's own)

function lastingIncidents(db: Pick<Db, "select">, siteId: string): GroupableIncident[] {
  const rows = db
    .select({ id: incidents.id, startedAtMs: incidents.startedAtMs, endedAtMs: incidents.endedAtMs })
    .from(incidents)
    .where(and(eq(incidents.siteId, siteId), isNull(incidents.endedAtMs)))
    .all();
  const members = membersOf(
    db,
    rows.map((r) => r.id),
  );
  return rows.map((r) => ({ ...r, members: members.get(r.id) ?? [] }));
}

/** Whether the site has an incident still lasting (the alarm service asks before its end checks). */
export function hasLastingIncident(db: Db, siteId: string): boolean {
  return !!db
    .select({ id: incidents.id })
    .from(incidents)
    .where(and(eq(incidents.siteId, siteId), isNull(incidents.endedAtMs)))
    .get();
}

/**
 * Files a new activation into the lasting incident it belongs to, or opens one. The server's own
 * derivation of the recorded alarm history, so not an audit entry (people's changes are).
 */
export function fileActivation(
  db: Db,
  siteId: string,
  activation: { alarmId: string; activeSinceMs: number },
  nowMs = Date.now(),
): string {
  return db.transaction(
    (tx) => {
      const existing = tx
        .select({ incidentId: incidentAlarms.incidentId })
        .from(incidentAlarms)
        .where(
          and(
            eq(incidentAlarms.alarmId, activation.alarmId),
            eq(incidentAlarms.activeSinceMs, activation.activeSinceMs),
          ),
        )
        .get();
      if (existing) return existing.incidentId;
      const alarm = tx
        .select({ ruleId: alarms.ruleId, equipment: alarms.equipment })
        .from(alarms)
        .where(eq(alarms.id, activation.alarmId))
        .get();
      if (!alarm) throw new Error(`no alarm ${activation.alarmId}`);
      const lasting = lastingIncidents(tx, siteId);
      const target = incidentFor(lasting, { ruleId: alarm.ruleId, activeSinceMs: activation.activeSinceMs });
      const newMember: MemberActivation = { ...activation, ...alarm, clearedAtMs: null };
      if (target) {
        const inc = lasting.find((i) => i.id === target.incidentId)!;
        const members = [...inc.members, newMember];
        tx.insert(incidentAlarms)
          .values({ incidentId: inc.id, ...activation })
          .run();
        const row = tx
          .select({ titleByPerson: incidents.titleByPerson })
          .from(incidents)
          .where(eq(incidents.id, inc.id))
          .get()!;
        tx.update(incidents)
          .set({
            startedAtMs: Math.min(inc.startedAtMs, activation.activeSinceMs),
            rootHint: rootHintOf(members),
            ...(row.titleByPerson ? {} : { title: automaticTitle(members) }),
            updatedAt: new Date(nowMs),
          })
          .where(eq(incidents.id, inc.id))
          .run();
        return inc.id;
      }
      const id = randomUUID();
      tx.insert(incidents)
        .values({
          id,
          siteId,
          title: automaticTitle([newMember]),
          startedAtMs: activation.activeSinceMs,
          rootHint: rootHintOf([newMember]),
          updatedAt: new Date(nowMs),
        })
        .run();
      tx.insert(incidentAlarms)
        .values({ incidentId: id, ...activation })
        .run();
      return id;
    },
    { behavior: "immediate" },
  );
}

/** Ends the site's lasting incidents whose members all returned to normal a quiet period before `nowMs` (event time). */
export function endQuietIncidents(db: Db, siteId: string, nowMs: number): string[] {
  const ended: string[] = [];
  const lasting = lastingIncidents(db, siteId);
  const due = lasting
    .map((i) => ({ id: i.id, endMs: incidentEndMs(i.members, nowMs) }))
    .filter((x): x is { id: string; endMs: number } => x.endMs !== null);
  if (!due.length) return ended;
  db.transaction(
    (tx) => {
      for (const d of due) {
        tx.update(incidents)
          .set({
            endedAtMs: d.endMs,
            // Ending resolves an open incident; a reviewed one stays reviewed.
            state: sql`case when ${incidents.state} = 'open' then 'resolved' else ${incidents.state} end`,
            updatedAt: new Date(),
          })
          .where(eq(incidents.id, d.id))
          .run();
        ended.push(d.id);
      }
    },
    { behavior: "immediate" },
  );
  return ended;
}

/**
 * A simulated run replaced the site's timeline from `fromMs`: incidents that began after it describe
 * readings that are gone and are removed (unless a drill refers to one); those lasting are ended there.
 */
export function resetIncidentsFrom(db: Db, siteId: string, fromMs: number): void {
  db.transaction(
    (tx) => {
      const later = tx
        .select({ id: incidents.id })
        .from(incidents)
        .where(
          and(
            eq(incidents.siteId, siteId),
            gte(incidents.startedAtMs, fromMs),
            sql`not exists (select 1 from ${drills} where ${drills.incidentId} = ${incidents.id})`,
          ),
        )
        .all()
        .map((r) => r.id);
      if (later.length) tx.delete(incidents).where(inArray(incidents.id, later)).run();
      tx.update(incidents)
        .set({
          endedAtMs: fromMs,
          state: sql`case when ${incidents.state} = 'open' then 'resolved' else ${incidents.state} end`,
          updatedAt: new Date(),
        })
        .where(and(eq(incidents.siteId, siteId), isNull(incidents.endedAtMs)))
        .run();
    },
    { behavior: "immediate" },
  );
}

// ---------------------------------------------------------------- reading, with the viewer

const summaryColumns = {
  id: incidents.id,
  siteId: incidents.siteId,
  siteName: sites.name,
  siteTimeZone: sites.timeZone,
  title: incidents.title,
  titleByPerson: incidents.titleByPerson,
  state: incidents.state,
  startedAtMs: incidents.startedAtMs,
  endedAtMs: incidents.endedAtMs,
  rootHint: incidents.rootHint,
  cause: incidents.cause,
  lesson: incidents.lesson,
  customerSummary: incidents.customerSummary,
  sharedWithCustomerAt: incidents.sharedWithCustomerAt,
  alarmCount: sql<number>`(select count(*) from ${incidentAlarms} where ${incidentAlarms.incidentId} = ${incidents.id})`,
};

/** Staff see every incident; a customer only their organization's shared ones, never a training site's. */
function incidentScope(viewer: Viewer): SQL | undefined {
  if (seesAllSites(viewer)) return undefined;
  return and(
    eq(sites.organizationId, viewer.organizationId),
    eq(sites.training, false),
    isNotNull(incidents.sharedWithCustomerAt),
  );
}

type Row = {
  [K in keyof typeof summaryColumns]: unknown;
} & {
  id: string;
  siteId: string;
  siteName: string;
  siteTimeZone: string;
  title: string;
  titleByPerson: boolean;
  state: IncidentState;
  startedAtMs: number;
  endedAtMs: number | null;
  rootHint: string | null;
  cause: string;
  lesson: string;
  customerSummary: string;
  sharedWithCustomerAt: Date | null;
  alarmCount: number;
};

function toSummary(r: Row): IncidentSummaryDto {
  return {
    id: r.id,
    siteId: r.siteId,
    siteName: r.siteName,
    siteTimeZone: r.siteTimeZone,
    title: r.title,
    state: r.state,
    startedAtMs: r.startedAtMs,
    endedAtMs: r.endedAtMs,
    rootHint: r.rootHint,
    alarmCount: r.alarmCount,
    shared: r.sharedWithCustomerAt !== null,
  };
}

export function listIncidents(
  db: Db,
  viewer: Viewer,
  filter: { siteId?: string; state?: IncidentState; limit?: number } = {},
): IncidentSummaryDto[] {
  const where = [incidentScope(viewer)];
  if (filter.siteId) where.push(eq(incidents.siteId, filter.siteId));
  if (filter.state) where.push(eq(incidents.state, filter.state));
  return (
    db
      .select(summaryColumns)
      .from(incidents)
      .innerJoin(sites, eq(sites.id, incidents.siteId))
      .where(and(...where))
      .orderBy(desc(incidents.startedAtMs))
      .limit(filter.limit ?? 200)
      .all() as Row[]
  ).map(toSummary);
}

export function getIncident(db: Pick<Db, "select">, viewer: Viewer, incidentId: string): IncidentDto | null {
  const row = db
    .select(summaryColumns)
    .from(incidents)
    .innerJoin(sites, eq(sites.id, incidents.siteId))
    .where(and(eq(incidents.id, incidentId), incidentScope(viewer)))
    .get() as Row | undefined;
  if (!row) return null;
  const staff = seesAllSites(viewer);
  return {
    ...toSummary(row),
    titleByPerson: row.titleByPerson,
    cause: staff ? row.cause : "",
    lesson: staff ? row.lesson : "",
    customerSummary: row.customerSummary,
    sharedWithCustomerAt: row.sharedWithCustomerAt?.getTime() ?? null,
    members: staff ? (membersOf(db, [incidentId]).get(incidentId) ?? []) : [],
  };
}

/** The incident a member of staff may change (404 for anyone else's view of it, 403 for customers). */
function requireChangeable(db: Pick<Db, "select">, viewer: Viewer, incidentId: string): IncidentDto {
  const inc = getIncident(db, viewer, incidentId);
  if (!inc) throw notFound("No such incident.");
  if (!canAct(viewer)) throw new AppError("forbidden", "Only the service company's staff can change incidents.");
  return inc;
}

export interface IncidentPatch {
  title?: string;
  state?: IncidentState;
  cause?: string;
  lesson?: string;
  customerSummary?: string;
  shared?: boolean;
}

const auditView = (i: IncidentDto) => ({
  title: i.title,
  state: i.state,
  cause: i.cause,
  lesson: i.lesson,
  customerSummary: i.customerSummary,
  shared: i.sharedWithCustomerAt !== null,
});

export function updateIncident(db: Db, viewer: Viewer, incidentId: string, patch: IncidentPatch): IncidentDto {
  return db.transaction(
    (tx) => {
      const before = requireChangeable(tx, viewer, incidentId);
      if (patch.state === "reviewed" && before.endedAtMs === null && before.state === "open")
        throw new AppError(
          "conflict",
          "Resolve the incident (or let its alarms return to normal) before marking it reviewed.",
        );
      if (patch.shared && !(patch.customerSummary ?? before.customerSummary).trim())
        throw new AppError("bad_request", "Write the customer's version before sharing it.");
      const now = new Date();
      tx.update(incidents)
        .set({
          ...(patch.title !== undefined ? { title: patch.title, titleByPerson: true } : {}),
          ...(patch.state !== undefined ? { state: patch.state } : {}),
          ...(patch.cause !== undefined ? { cause: patch.cause } : {}),
          ...(patch.lesson !== undefined ? { lesson: patch.lesson } : {}),
          ...(patch.customerSummary !== undefined ? { customerSummary: patch.customerSummary } : {}),
          ...(patch.shared !== undefined
            ? {
                sharedWithCustomerAt: patch.shared
                  ? before.sharedWithCustomerAt
                    ? new Date(before.sharedWithCustomerAt)
                    : now
                  : null,
              }
            : {}),
          updatedAt: now,
        })
        .where(eq(incidents.id, incidentId))
        .run();
      const after = getIncident(tx, viewer, incidentId)!;
      writeAudit(tx, viewer, {
        action: "update",
        entityType: "incident",
        entityId: incidentId,
        siteId: before.siteId,
        summary: `Incident updated: ${after.title}`,
        before: auditView(before),
        after: auditView(after),
      });
      return after;
    },
    { behavior: "immediate" },
  );
}

/** Moves every member of `fromId` into `intoId` (same site) and removes `fromId`. */
export function mergeIncidents(db: Db, viewer: Viewer, intoId: string, fromId: string): IncidentDto {
  if (intoId === fromId) throw new AppError("bad_request", "Choose another incident to merge.");
  return db.transaction(
    (tx) => {
      const into = requireChangeable(tx, viewer, intoId);
      const from = requireChangeable(tx, viewer, fromId);
      if (into.siteId !== from.siteId)
        throw new AppError("bad_request", "Only incidents of the same site can be merged.");
      const span = mergedSpan(into, from);
      tx.update(incidentAlarms).set({ incidentId: intoId }).where(eq(incidentAlarms.incidentId, fromId)).run();
      tx.update(drills).set({ incidentId: intoId }).where(eq(drills.incidentId, fromId)).run();
      const members = [...into.members, ...from.members];
      tx.update(incidents)
        .set({
          ...span,
          rootHint: rootHintOf(members),
          ...(into.titleByPerson ? {} : { title: automaticTitle(members) }),
          // A merged incident still lasting is open again.
          ...(span.endedAtMs === null && into.state !== "open" ? { state: "open" as const } : {}),
          updatedAt: new Date(),
        })
        .where(eq(incidents.id, intoId))
        .run();
      tx.delete(incidents).where(eq(incidents.id, fromId)).run();
      const after = getIncident(tx, viewer, intoId)!;
      writeAudit(tx, viewer, {
        action: "update",
        entityType: "incident",
        entityId: intoId,
        siteId: into.siteId,
        summary: `Incident merged: "${from.title}" into "${into.title}"`,
        before: { into: auditView(into), from: { id: fromId, ...auditView(from), alarms: from.members.length } },
        after: { ...auditView(after), alarms: after.members.length },
      });
      return after;
    },
    { behavior: "immediate" },
  );
}

/** Moves the chosen activations out into a new incident; returns the new one. */
export function splitIncident(
  db: Db,
  viewer: Viewer,
  incidentId: string,
  moved: readonly ActivationRef[],
  title?: string,
): IncidentDto {
  return db.transaction(
    (tx) => {
      const inc = requireChangeable(tx, viewer, incidentId);
      const parts = splitMembers(inc.members, moved);
      if ("error" in parts) throw new AppError("bad_request", parts.error);
      const id = randomUUID();
      const span = spanOf(parts.moved);
      const now = new Date();
      tx.insert(incidents)
        .values({
          id,
          siteId: inc.siteId,
          title: title?.trim() || automaticTitle(parts.moved),
          titleByPerson: !!title?.trim(),
          state: span.lastClearMs === null ? "open" : "resolved",
          startedAtMs: span.startedAtMs,
          endedAtMs: span.lastClearMs,
          rootHint: rootHintOf(parts.moved),
          updatedAt: now,
        })
        .run();
      for (const m of parts.moved)
        tx.update(incidentAlarms)
          .set({ incidentId: id })
          .where(and(eq(incidentAlarms.alarmId, m.alarmId), eq(incidentAlarms.activeSinceMs, m.activeSinceMs)))
          .run();
      const kept = spanOf(parts.kept);
      tx.update(incidents)
        .set({
          startedAtMs: kept.startedAtMs,
          rootHint: rootHintOf(parts.kept),
          ...(inc.titleByPerson ? {} : { title: automaticTitle(parts.kept) }),
          ...(inc.endedAtMs !== null && kept.lastClearMs !== null ? { endedAtMs: kept.lastClearMs } : {}),
          updatedAt: now,
        })
        .where(eq(incidents.id, incidentId))
        .run();
      const created = getIncident(tx, viewer, id)!;
      writeAudit(tx, viewer, {
        action: "create",
        entityType: "incident",
        entityId: id,
        siteId: inc.siteId,
        summary: `Incident split: ${parts.moved.length} alarm(s) moved out of "${inc.title}" into "${created.title}"`,
        before: { from: incidentId, alarms: inc.members.length },
        after: {
          ...auditView(created),
          moved: parts.moved.map((m) => ({ alarmId: m.alarmId, activeSinceMs: m.activeSinceMs })),
        },
      });
      return created;
    },
    { behavior: "immediate" },
  );
}

// ---------------------------------------------------------------- what the review is made of

export interface ReviewSources {
  alarmTransitions: Array<{
    alarmId: string;
    ruleId: string;
    equipment: string;
    from: string;
    to: string;
    cause: string;
    priority: number;
    eventAtMs: number;
    wallAtMs: number;
    actor: string | null;
    note: string | null;
  }>;
  /** People's entries with their wall-clock times (mapped to event time by the caller). */
  notes: Array<{ wallMs: number; who: string; text: string; equipment: string }>;
  visitEntries: Array<{ wallMs: number; who: string; text: string }>;
  changes: Array<{
    madeWallMs: number;
    putBackWallMs: number | null;
    madeBy: string;
    putBackBy: string | null;
    equipment: string | null;
    what: string;
    fromValue: string;
    toValue: string;
  }>;
  /** The site's newest reading, to bound a lasting incident's window. */
  latestReadingMs: number | null;
}

/** Staff-only sources of a review (alarm history, notes, visits, temporary changes) within a window. */
export function reviewSources(db: Db, inc: IncidentDto, fromMs: number, toMs: number): ReviewSources {
  const alarmIds = [...new Set(inc.members.map((m) => m.alarmId))];
  const alarmTransitions = alarmIds.length
    ? db
        .select({
          alarmId: alarmEvents.alarmId,
          ruleId: alarms.ruleId,
          equipment: alarms.equipment,
          from: alarmEvents.fromState,
          to: alarmEvents.toState,
          cause: alarmEvents.cause,
          priority: alarmEvents.priority,
          eventAtMs: alarmEvents.eventAtMs,
          wallAtMs: alarmEvents.wallAtMs,
          actor: users.name,
          note: alarmEvents.note,
        })
        .from(alarmEvents)
        .innerJoin(alarms, eq(alarms.id, alarmEvents.alarmId))
        .leftJoin(users, eq(users.id, alarmEvents.actorUserId))
        .where(
          and(
            inArray(alarmEvents.alarmId, alarmIds),
            gte(alarmEvents.eventAtMs, fromMs),
            lte(alarmEvents.eventAtMs, toMs),
          ),
        )
        .orderBy(asc(alarmEvents.eventAtMs), asc(alarmEvents.id))
        .all()
    : [];
  // People's entries carry wall time: look a generous span around the transitions' wall times.
  const walls = alarmTransitions.map((t) => t.wallAtMs);
  const wallFrom = Math.min(fromMs, ...walls) - 6 * 3_600_000;
  const wallTo = Math.max(toMs, ...walls) + 6 * 3_600_000;
  const notes = alarmIds.length
    ? db
        .select({ wallMs: alarmNotes.createdAt, who: users.name, text: alarmNotes.text, equipment: alarms.equipment })
        .from(alarmNotes)
        .innerJoin(users, eq(users.id, alarmNotes.userId))
        .innerJoin(alarms, eq(alarms.id, alarmNotes.alarmId))
        .where(
          and(
            inArray(alarmNotes.alarmId, alarmIds),
            gte(alarmNotes.createdAt, wallFrom),
            lte(alarmNotes.createdAt, wallTo),
          ),
        )
        .all()
    : [];
  const entries = db
    .select({ wallMs: visitEntries.at, who: users.name, text: visitEntries.text })
    .from(visitEntries)
    .innerJoin(visits, eq(visits.id, visitEntries.visitId))
    .innerJoin(users, eq(users.id, visitEntries.authorId))
    .where(
      and(
        eq(visits.siteId, inc.siteId),
        gte(visitEntries.at, new Date(wallFrom)),
        lte(visitEntries.at, new Date(wallTo)),
      ),
    )
    .all()
    .map((e) => ({ ...e, wallMs: e.wallMs.getTime() }));
  const putBackUser = sql<
    string | null
  >`(select ${users.name} from ${users} where ${users.id} = ${temporaryChanges.putBackBy})`;
  const changes = db
    .select({
      madeAt: temporaryChanges.madeAt,
      putBackAt: temporaryChanges.putBackAt,
      madeBy: users.name,
      putBackBy: putBackUser,
      equipment: equipment.tag,
      what: temporaryChanges.what,
      fromValue: temporaryChanges.fromValue,
      toValue: temporaryChanges.toValue,
    })
    .from(temporaryChanges)
    .innerJoin(users, eq(users.id, temporaryChanges.madeBy))
    .leftJoin(equipment, eq(equipment.id, temporaryChanges.equipmentId))
    .where(
      and(
        eq(temporaryChanges.siteId, inc.siteId),
        gte(temporaryChanges.madeAt, new Date(wallFrom)),
        lte(temporaryChanges.madeAt, new Date(wallTo)),
      ),
    )
    .all()
    .map((c) => ({
      madeWallMs: c.madeAt.getTime(),
      putBackWallMs: c.putBackAt?.getTime() ?? null,
      madeBy: c.madeBy,
      putBackBy: c.putBackBy,
      equipment: c.equipment,
      what: c.what,
      fromValue: c.fromValue,
      toValue: c.toValue,
    }));
  const latest = db
    .select({ ts: sql<number | null>`max(${latestValues.ts})` })
    .from(latestValues)
    .innerJoin(points, eq(points.id, latestValues.pointId))
    .innerJoin(equipment, eq(equipment.id, points.equipmentId))
    .where(eq(equipment.siteId, inc.siteId))
    .get();
  return { alarmTransitions, notes, visitEntries: entries, changes, latestReadingMs: latest?.ts ?? null };
}

/** The site's equipment tags by kind (to choose what to chart). */
export function siteEquipmentKinds(
  db: Db,
  siteId: string,
): Array<{ tag: string; kind: string; serves: string | null }> {
  return db
    .select({ tag: equipment.tag, kind: equipment.kind, serves: equipment.serves })
    .from(equipment)
    .where(eq(equipment.siteId, siteId))
    .all();
}

/**
 * Stored readings of the chosen points in a window: numbers averaged into `bucketMs` buckets, state
 * and boolean points as their changes only (every change is an event worth showing).
 */
export function incidentReadings(
  db: Db,
  siteId: string,
  wanted: ReadonlyArray<{ equipment: string; quantity: string }>,
  fromMs: number,
  toMs: number,
  bucketMs: number,
): {
  numbers: Array<{ equipment: string; quantity: string; tsMs: number[]; values: number[] }>;
  changes: Array<{ equipment: string; quantity: string; points: { tsMs: number; value: number | string | null }[] }>;
} {
  if (!wanted.length) return { numbers: [], changes: [] };
  const found = db
    .select({ id: points.id, equipment: equipment.tag, quantity: points.quantity })
    .from(points)
    .innerJoin(equipment, eq(equipment.id, points.equipmentId))
    .where(
      and(
        eq(equipment.siteId, siteId),
        inArray(
          sql`${equipment.tag} || ':' || ${points.quantity}`,
          wanted.map((w) => `${w.equipment}:${w.quantity}`),
        ),
      ),
    )
    .all();
  if (!found.length) return { numbers: [], changes: [] };
  const ids = found.map((f) => f.id);
  const byId = new Map(found.map((f) => [f.id, f]));
  const placeholders = ids.map(() => "?").join(",");
  const raw = db.$client;
  const bucketRows = raw
    .prepare(
      `select point_id as pointId, (ts / ?) * ? as t, avg(value) as v from readings
       where point_id in (${placeholders}) and ts >= ? and ts <= ? and value is not null
       group by point_id, t order by point_id, t`,
    )
    .all(bucketMs, bucketMs, ...ids, fromMs, toMs) as Array<{ pointId: number; t: number; v: number }>;
  // A change is a reading unlike the one before it; the last before the window sets where each started.
  const changeRows = raw
    .prepare(
      `select pointId, ts, value, text from (
         select point_id as pointId, ts, value, text,
                lag(coalesce(text, value)) over (partition by point_id order by ts) as prev
         from readings where point_id in (${placeholders}) and ts >= ? and ts <= ?
       ) where prev is null or prev is not coalesce(text, value) order by pointId, ts`,
    )
    .all(...ids, fromMs - 3_600_000, toMs) as Array<{
    pointId: number;
    ts: number;
    value: number | null;
    text: string | null;
  }>;
  const numbers = new Map<number, { equipment: string; quantity: string; tsMs: number[]; values: number[] }>();
  for (const r of bucketRows) {
    const p = byId.get(r.pointId)!;
    const s = numbers.get(r.pointId) ?? { equipment: p.equipment, quantity: p.quantity, tsMs: [], values: [] };
    s.tsMs.push(r.t);
    s.values.push(r.v);
    numbers.set(r.pointId, s);
  }
  const changes = new Map<
    number,
    { equipment: string; quantity: string; points: { tsMs: number; value: number | string | null }[] }
  >();
  for (const r of changeRows) {
    const p = byId.get(r.pointId)!;
    const s = changes.get(r.pointId) ?? { equipment: p.equipment, quantity: p.quantity, points: [] };
    s.points.push({ tsMs: r.ts, value: r.text ?? r.value });
    changes.set(r.pointId, s);
  }
  return { numbers: [...numbers.values()], changes: [...changes.values()] };
}

export type { TimelineEntry };
