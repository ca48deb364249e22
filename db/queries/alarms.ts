import "server-only";
import { writeAudit } from "./audit";
import { randomUUID } from "node:crypto";
import { and, asc, desc, eq, inArray, ne, sql } from "drizzle-orm";
import type { Db } from "../client";
import { alarmEvents, alarmNotes, alarms, siteRuleSettings, sites, users } from "../schema";
import { seesAllSites, type Viewer } from "@/lib/auth/viewer";
import { siteScope } from "./sites";
import type { Alarm, AlarmState, TransitionRecord } from "@/lib/alarms";
import { withoutMovedLimits } from "@/lib/rules/settings";
import type { AlarmDetail, AlarmDto, AlarmNoteDto, AlarmWithHistoryDto } from "@/lib/dto/alarms";
import { renderDetailWords } from "@/lib/quantity-text";
import type { UnitSystem } from "@/lib/units";

/** An alarm note as screens get it: the author's name, never their id. */
const noteColumns = {
  id: alarmNotes.id,
  author: users.name,
  text: alarmNotes.text,
  visibility: alarmNotes.visibility,
  createdAt: alarmNotes.createdAt,
};

// Alarms as stored: one row per rule × equipment × site with its current ISA-18.2 state,
// an append-only event history, and notes. Customers read their own sites' alarms and the
// notes shared with them; nothing here lets them change anything.

const dtoColumns = {
  id: alarms.id,
  siteId: alarms.siteId,
  siteName: sites.name,
  siteTimeZone: sites.timeZone,
  ruleId: alarms.ruleId,
  equipment: alarms.equipment,
  priority: alarms.priority,
  state: alarms.state,
  conditionActive: alarms.conditionActive,
  activeSinceMs: alarms.activeSinceMs,
  lastTransitionMs: alarms.lastTransitionMs,
  activations: alarms.activations,
  machineJson: alarms.machineJson,
  detailJson: alarms.detailJson,
};

type DtoRow = Omit<AlarmDto, "state" | "shelvedUntilMs" | "shelveReason" | "detail"> & {
  state: string;
  machineJson: string;
  detailJson: string;
};

/**
 * `staff`: the viewer is the service company's; a shelving reason is a technician's words, like event notes.
 * `words`: the unit system the stored words' quantities are rendered in, or "tokens" to leave them for each
 * reader to render (status pushes go to rooms of viewers with different units).
 */
function toDto(row: DtoRow, staff: boolean, words: UnitSystem | "tokens"): AlarmDto {
  const { machineJson, detailJson, ...rest } = row;
  const machine = JSON.parse(machineJson) as Alarm;
  return {
    ...rest,
    state: rest.state as AlarmState,
    shelvedUntilMs: machine.shelf?.untilMs ?? null,
    shelveReason: staff ? (machine.shelf?.reason ?? null) : null,
    detail: renderedDetail(JSON.parse(detailJson) as AlarmDetail, words),
  };
}

function renderedDetail(detail: AlarmDetail, words: UnitSystem | "tokens"): AlarmDetail {
  return words === "tokens" ? detail : renderDetailWords(detail, words);
}

export interface AlarmFilter {
  siteId?: string;
  states?: AlarmState[];
  priority?: number;
  /** Include alarms in `normal` (the full configured list). Default: only those not normal. */
  includeNormal?: boolean;
  /** Leave quantity tokens in the stored words for the reader to render (default: the viewer's units). */
  keepTokens?: boolean;
}

export function listAlarms(db: Db, viewer: Viewer, filter: AlarmFilter = {}): AlarmDto[] {
  const where = [siteScope(viewer)];
  if (filter.siteId) where.push(eq(alarms.siteId, filter.siteId));
  if (filter.states?.length) where.push(inArray(alarms.state, filter.states));
  else if (!filter.includeNormal) where.push(ne(alarms.state, "normal"));
  if (filter.priority) where.push(eq(alarms.priority, filter.priority));
  return db
    .select(dtoColumns)
    .from(alarms)
    .innerJoin(sites, eq(sites.id, alarms.siteId))
    .where(and(...where))
    .orderBy(asc(alarms.priority), desc(alarms.lastTransitionMs))
    .all()
    .map((row) => toDto(row, seesAllSites(viewer), filter.keepTokens ? "tokens" : viewer.unitSystem));
}

/** Live words newer than the stored ones, from the running alarm service (by site and alarm key). */
export type LatestDetail = (siteId: string, key: string) => AlarmDetail | undefined;

export function getAlarm(
  db: Db,
  viewer: Viewer,
  alarmId: string,
  latestDetail?: LatestDetail,
): AlarmWithHistoryDto | null {
  const stored = db
    .select({ ...dtoColumns, key: alarms.key, raisedDetailJson: alarms.raisedDetailJson })
    .from(alarms)
    .innerJoin(sites, eq(sites.id, alarms.siteId))
    .where(and(eq(alarms.id, alarmId), siteScope(viewer)))
    .get();
  if (!stored) return null;
  const { raisedDetailJson, key, ...row } = stored;
  const staff = seesAllSites(viewer);
  const events = db
    .select({
      id: alarmEvents.id,
      from: alarmEvents.fromState,
      to: alarmEvents.toState,
      cause: alarmEvents.cause,
      eventAtMs: alarmEvents.eventAtMs,
      wallAtMs: alarmEvents.wallAtMs,
      actor: users.name,
      note: alarmEvents.note,
    })
    .from(alarmEvents)
    .leftJoin(users, eq(users.id, alarmEvents.actorUserId))
    .where(eq(alarmEvents.alarmId, alarmId))
    .orderBy(asc(alarmEvents.id))
    .all()
    .map((e) => (staff ? e : { ...e, note: null }));
  const notes = db
    .select(noteColumns)
    .from(alarmNotes)
    .innerJoin(users, eq(users.id, alarmNotes.userId))
    .where(and(eq(alarmNotes.alarmId, alarmId), staff ? undefined : eq(alarmNotes.visibility, "customer")))
    .orderBy(asc(alarmNotes.id))
    .all();
  const raisedDetail = raisedDetailJson
    ? renderedDetail(JSON.parse(raisedDetailJson) as AlarmDetail, viewer.unitSystem)
    : null;
  const dto = toDto(row, staff, viewer.unitSystem);
  // The stored words refresh their numbers every few minutes; the rules in memory have this evaluation's.
  const live = latestDetail?.(row.siteId, key);
  if (live && live.atMs > dto.detail.atMs) dto.detail = renderedDetail(live, viewer.unitSystem);
  return { ...dto, raisedDetail, events, notes };
}

/** The alarm's site and key, when the viewer may see it (for commands). */
export function findAlarmRef(
  db: Db,
  viewer: Viewer,
  alarmId: string,
): { id: string; siteId: string; key: string } | null {
  return (
    db
      .select({ id: alarms.id, siteId: alarms.siteId, key: alarms.key })
      .from(alarms)
      .innerJoin(sites, eq(sites.id, alarms.siteId))
      .where(and(eq(alarms.id, alarmId), siteScope(viewer)))
      .get() ?? null
  );
}

export function addNote(
  db: Db,
  viewer: Viewer,
  alarmId: string,
  text: string,
  visibility: "internal" | "customer",
): AlarmNoteDto {
  const id = db.insert(alarmNotes).values({ alarmId, userId: viewer.userId, text, visibility }).run()
    .lastInsertRowid as number;
  return db
    .select(noteColumns)
    .from(alarmNotes)
    .innerJoin(users, eq(users.id, alarmNotes.userId))
    .where(eq(alarmNotes.id, id))
    .get()!;
}

/** Every stored state machine of a site, so a restarted server resumes its alarms. */
export function loadAlarmMachines(db: Db, siteId: string): Alarm[] {
  return db
    .select({ machineJson: alarms.machineJson })
    .from(alarms)
    .where(eq(alarms.siteId, siteId))
    .all()
    .map((r) => JSON.parse(r.machineJson) as Alarm);
}

export interface StoredTransition {
  alarmId: string;
  record: TransitionRecord;
}

/**
 * Saves the alarms that changed and appends their transitions, in one transaction.
 * `details` carries the latest condition words per alarm key (kept even without a transition).
 */
export function saveAlarmChanges(
  db: Db,
  siteId: string,
  changed: readonly Alarm[],
  transitions: readonly TransitionRecord[],
  details: ReadonlyMap<string, AlarmDetail>,
): StoredTransition[] {
  const stored: StoredTransition[] = [];
  db.transaction(
    (tx) => {
      const ids = new Map<string, string>();
      for (const a of changed) {
        const detail = details.get(a.key);
        const existing = tx
          .select({ id: alarms.id, activeSinceMs: alarms.activeSinceMs })
          .from(alarms)
          .where(and(eq(alarms.siteId, siteId), eq(alarms.key, a.key)))
          .get();
        const becameActive = transitions.some((t) => t.alarmKey === a.key && t.cause === "condition_active");
        const values = {
          priority: a.priority,
          state: a.state,
          conditionActive: a.conditionActive,
          machineJson: JSON.stringify(a),
          lastTransitionMs: a.lastTransitionMs,
          activeSinceMs: a.conditionActive
            ? becameActive
              ? a.conditionSinceMs
              : (existing?.activeSinceMs ?? a.conditionSinceMs)
            : (existing?.activeSinceMs ?? null),
          updatedAt: Date.now(),
          ...(detail ? { detailJson: JSON.stringify(detail) } : {}),
          // Kept beside the latest words, so the alarm can show what it read when raised and what it reads now.
          ...(detail && becameActive ? { raisedDetailJson: JSON.stringify(detail) } : {}),
        };
        if (existing) {
          tx.update(alarms)
            .set({ ...values, ...(becameActive ? { activations: sql`${alarms.activations} + 1` } : {}) })
            .where(eq(alarms.id, existing.id))
            .run();
          ids.set(a.key, existing.id);
        } else {
          const id = randomUUID();
          tx.insert(alarms)
            .values({
              id,
              siteId,
              key: a.key,
              ruleId: a.ruleId,
              equipment: a.equipment,
              ...values,
              detailJson: JSON.stringify(detail ?? emptyDetail(a)),
              activations: becameActive ? 1 : 0,
            })
            .run();
          ids.set(a.key, id);
        }
      }
      for (const t of transitions) {
        const alarmId = ids.get(t.alarmKey);
        if (!alarmId) continue;
        tx.insert(alarmEvents)
          .values({
            alarmId,
            siteId,
            fromState: t.from,
            toState: t.to,
            cause: t.cause,
            priority: t.priority,
            eventAtMs: t.atMs,
            actorUserId: t.actor.kind === "person" ? t.actor.id : null,
            note: t.note,
          })
          .run();
        stored.push({ alarmId, record: t });
      }
    },
    { behavior: "immediate" },
  );
  return stored;
}

function emptyDetail(a: Alarm): AlarmDetail {
  const what = `${a.equipment}: ${a.ruleId.replaceAll("_", " ")}`;
  return {
    technicianMessage: what,
    ownerMessage: "",
    advice: [],
    caution: null,
    numbers: {},
    related: [],
    atMs: a.lastTransitionMs ?? 0,
  };
}

/** Per visible site: the worst annunciated alarm and how many wait for acknowledgement. */
export function alarmSummaryBySite(
  db: Db,
  viewer: Viewer,
): Map<string, { worst: AlarmDto | null; unacknowledged: number }> {
  const active = listAlarms(db, viewer, {
    states: ["unacknowledged", "acknowledged", "returned_unacknowledged", "latched"],
    // Status pushes reach viewers with different units: each browser renders the quantities.
    keepTokens: true,
  });
  const out = new Map<string, { worst: AlarmDto | null; unacknowledged: number }>();
  for (const a of active) {
    const s = out.get(a.siteId) ?? { worst: null, unacknowledged: 0 };
    if (a.state !== "acknowledged") s.unacknowledged++;
    // Active conditions outrank ones that have already cleared.
    const rank = (x: AlarmDto) => x.priority * 2 - (x.conditionActive ? 1 : 0);
    if (!s.worst || rank(a) < rank(s.worst)) s.worst = a;
    out.set(a.siteId, s);
  }
  return out;
}

/** Transition history across sites for the alarm-system health page (staff only). */
export function transitionsSince(db: Db, sinceMs: number) {
  return db
    .select({
      alarmId: alarmEvents.alarmId,
      siteId: alarmEvents.siteId,
      key: alarms.key,
      ruleId: alarms.ruleId,
      equipment: alarms.equipment,
      from: alarmEvents.fromState,
      to: alarmEvents.toState,
      cause: alarmEvents.cause,
      priority: alarmEvents.priority,
      atMs: alarmEvents.eventAtMs,
      actorUserId: alarmEvents.actorUserId,
      note: alarmEvents.note,
    })
    .from(alarmEvents)
    .innerJoin(alarms, eq(alarms.id, alarmEvents.alarmId))
    .where(sql`${alarmEvents.eventAtMs} >= ${sinceMs}`)
    .orderBy(asc(alarmEvents.eventAtMs))
    .all();
}

/** Every alarm's state machine across all sites (staff-only health page). */
export function allAlarmMachines(db: Db): Alarm[] {
  return db
    .select({ machineJson: alarms.machineJson })
    .from(alarms)
    .all()
    .map((r) => JSON.parse(r.machineJson) as Alarm);
}

/** The admin's stored overrides of a site's rule settings (defaults fill the rest). */
export function getRuleOverrides(db: Db, siteId: string): unknown {
  const row = db
    .select({ json: siteRuleSettings.settingsJson })
    .from(siteRuleSettings)
    .where(eq(siteRuleSettings.siteId, siteId))
    .get();
  // Limits stored here before they moved to the equipment records are dropped, not refused.
  return row ? withoutMovedLimits(JSON.parse(row.json)) : {};
}

export function saveRuleOverrides(db: Db, viewer: Viewer, siteId: string, overrides: unknown): void {
  const settingsJson = JSON.stringify(overrides);
  db.transaction(
    (tx) => {
      const before = getRuleOverrides(db, siteId);
      tx.insert(siteRuleSettings)
        .values({ siteId, settingsJson, updatedBy: viewer.userId === "system" ? null : viewer.userId })
        .onConflictDoUpdate({
          target: siteRuleSettings.siteId,
          set: { settingsJson, updatedAt: Date.now(), updatedBy: viewer.userId === "system" ? null : viewer.userId },
        })
        .run();
      writeAudit(tx, viewer, {
        action: "update",
        entityType: "rule_settings",
        entityId: siteId,
        siteId,
        summary: "Rule settings saved",
        before,
        after: overrides,
      });
    },
    { behavior: "immediate" },
  );
}
