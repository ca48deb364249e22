import { sql } from "drizzle-orm";
import { index, integer, primaryKey, real, sqliteTable, text } from "drizzle-orm/sqlite-core";
import { alarms } from "./alarms";
import { sites, users } from "./core";

// Learning from incidents: related alarms grouped into an incident with its cause and lesson, and
// drills in which a trainee works a simulated plant and is scored afterwards.

const createdAt = () =>
  integer("created_at", { mode: "timestamp_ms" })
    .notNull()
    .default(sql`(unixepoch('subsec') * 1000)`);
const ms = (name: string) => integer(name, { mode: "timestamp_ms" });

export const incidentStates = ["open", "resolved", "reviewed"] as const;

export const incidents = sqliteTable(
  "incidents",
  {
    id: text("id").primaryKey(),
    siteId: text("site_id")
      .notNull()
      .references(() => sites.id),
    title: text("title").notNull(),
    /** True once a person named it: automatic grouping no longer renames it. */
    titleByPerson: integer("title_by_person", { mode: "boolean" }).notNull().default(false),
    state: text("state", { enum: incidentStates }).notNull().default("open"),
    /** Event time (the readings' clock) of the first member's activation, and of the last return to normal. */
    startedAtMs: integer("started_at_ms").notNull(),
    endedAtMs: integer("ended_at_ms"),
    /** The root-cause hint that tied members together (a rule id such as `power_event`), if any. */
    rootHint: text("root_hint"),
    cause: text("cause").notNull().default(""),
    lesson: text("lesson").notNull().default(""),
    /** The plain-language version for the customer; shown to them only once shared. */
    customerSummary: text("customer_summary").notNull().default(""),
    sharedWithCustomerAt: ms("shared_with_customer_at"),
    createdAt: createdAt(),
    updatedAt: ms("updated_at").notNull(),
  },
  (t) => [index("incidents_site_idx").on(t.siteId, t.startedAtMs)],
);

/** One activation of an alarm (an alarm row spans many activations over time) belongs to one incident. */
export const incidentAlarms = sqliteTable(
  "incident_alarms",
  {
    incidentId: text("incident_id")
      .notNull()
      .references(() => incidents.id, { onDelete: "cascade" }),
    alarmId: text("alarm_id")
      .notNull()
      .references(() => alarms.id, { onDelete: "cascade" }),
    /** Event time this activation began (`alarms.active_since_ms` at the time), ms. */
    activeSinceMs: integer("active_since_ms").notNull(),
  },
  (t) => [
    primaryKey({ columns: [t.alarmId, t.activeSinceMs] }),
    index("incident_alarms_incident_idx").on(t.incidentId),
  ],
);

/** A simulator starting point saved from a real incident's conditions, offered as a drill scenario. */
export const savedScenarios = sqliteTable("saved_scenarios", {
  id: text("id").primaryKey(),
  name: text("name").notNull(),
  fromIncidentId: text("from_incident_id").references(() => incidents.id),
  /** The base scenario and the initial conditions read from the incident's stored readings. */
  definition: text("definition", { mode: "json" }).$type<unknown>().notNull(),
  createdBy: text("created_by")
    .notNull()
    .references(() => users.id),
  createdAt: createdAt(),
});

export const drillStates = ["running", "ended"] as const;
export const drillOutcomes = ["avoided", "crossed", "timed_out", "stopped"] as const;

export const drills = sqliteTable(
  "drills",
  {
    id: text("id").primaryKey(),
    /** A training site: never pages anyone and never shows to customers. */
    siteId: text("site_id")
      .notNull()
      .references(() => sites.id),
    traineeId: text("trainee_id")
      .notNull()
      .references(() => users.id),
    startedBy: text("started_by")
      .notNull()
      .references(() => users.id),
    /** A built-in scenario name, or `saved:{id}`. */
    scenario: text("scenario").notNull(),
    speed: integer("speed").notNull(),
    seed: integer("seed").notNull(),
    hints: integer("hints", { mode: "boolean" }).notNull(),
    state: text("state", { enum: drillStates }).notNull().default("running"),
    outcome: text("outcome", { enum: drillOutcomes }),
    /** Event time of scenario second 0 and of the end, ms. */
    startedAtMs: integer("started_at_ms").notNull(),
    endedAtMs: integer("ended_at_ms"),
    /** The score's parts (crossover avoided, drive-temperature peak, time to first useful action, changes put back). */
    score: text("score", { mode: "json" }).$type<unknown>(),
    scorePct: real("score_pct"),
    incidentId: text("incident_id").references(() => incidents.id),
    createdAt: createdAt(),
  },
  (t) => [index("drills_trainee_idx").on(t.traineeId, t.createdAt), index("drills_site_idx").on(t.siteId)],
);

/** What the trainee did, with the advice the rules gave at that moment. */
export const drillSteps = sqliteTable(
  "drill_steps",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    drillId: text("drill_id")
      .notNull()
      .references(() => drills.id, { onDelete: "cascade" }),
    /** Event time, ms. */
    atMs: integer("at_ms").notNull(),
    userId: text("user_id").references(() => users.id),
    /** `command` (a drill action), `ack`, `note`, `hint`. */
    kind: text("kind").notNull(),
    detail: text("detail", { mode: "json" }).$type<unknown>().notNull(),
    /** The active alarms' advice when the step was taken. */
    adviceAtTime: text("advice_at_time", { mode: "json" }).$type<unknown>(),
  },
  (t) => [index("drill_steps_drill_idx").on(t.drillId, t.atMs)],
);
