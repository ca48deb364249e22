import { sql } from "drizzle-orm";
import { index, integer, sqliteTable, text, uniqueIndex } from "drizzle-orm/sqlite-core";
import { sites, users } from "./core";

// Alarms, their append-only history, notes, on-call rota, e-mail escalation and the mail sink.
// alarm_events and alarm_notes are append-only: triggers in the migration refuse UPDATE/DELETE.

const wallNow = sql`(unixepoch('subsec') * 1000)`;

/** One row per configured alarm (rule × equipment × site), holding its current ISA-18.2 state. */
export const alarms = sqliteTable(
  "alarms",
  {
    id: text("id").primaryKey(),
    siteId: text("site_id")
      .notNull()
      .references(() => sites.id, { onDelete: "cascade" }),
    /** `ruleId:equipment`, the state machine's key. */
    key: text("key").notNull(),
    ruleId: text("rule_id").notNull(),
    equipment: text("equipment").notNull(),
    priority: integer("priority").notNull(),
    state: text("state").notNull(),
    conditionActive: integer("condition_active", { mode: "boolean" }).notNull(),
    /** The state machine's whole Alarm object, so a restart resumes where it stopped. */
    machineJson: text("machine_json").notNull(),
    /** The latest condition's words and numbers (technician and owner messages, advice, caution). */
    detailJson: text("detail_json").notNull(),
    /** The words and numbers when the current activation was raised (null before the first, or on older rows). */
    raisedDetailJson: text("raised_detail_json"),
    /** Event time the current activation began, ms. */
    activeSinceMs: integer("active_since_ms"),
    lastTransitionMs: integer("last_transition_ms"),
    activations: integer("activations").notNull().default(0),
    updatedAt: integer("updated_at").notNull().default(wallNow),
  },
  (t) => [uniqueIndex("alarms_site_key_unique").on(t.siteId, t.key), index("alarms_state_idx").on(t.state)],
);

export const alarmEvents = sqliteTable(
  "alarm_events",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    alarmId: text("alarm_id")
      .notNull()
      .references(() => alarms.id, { onDelete: "cascade" }),
    siteId: text("site_id").notNull(),
    fromState: text("from_state").notNull(),
    toState: text("to_state").notNull(),
    cause: text("cause").notNull(),
    priority: integer("priority").notNull(),
    /** Event time (the readings' clock), ms. */
    eventAtMs: integer("event_at_ms").notNull(),
    /** Wall-clock time the server recorded it, ms. */
    wallAtMs: integer("wall_at_ms").notNull().default(wallNow),
    actorUserId: text("actor_user_id").references(() => users.id),
    note: text("note"),
  },
  (t) => [
    index("alarm_events_alarm_idx").on(t.alarmId, t.id),
    index("alarm_events_site_time_idx").on(t.siteId, t.eventAtMs),
  ],
);

export const alarmNotes = sqliteTable(
  "alarm_notes",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    alarmId: text("alarm_id")
      .notNull()
      .references(() => alarms.id, { onDelete: "cascade" }),
    userId: text("user_id")
      .notNull()
      .references(() => users.id),
    text: text("text").notNull(),
    /** `customer` notes are shown to the building owner; `internal` ones never are. */
    visibility: text("visibility", { enum: ["internal", "customer"] }).notNull(),
    createdAt: integer("created_at").notNull().default(wallNow),
  },
  (t) => [index("alarm_notes_alarm_idx").on(t.alarmId)],
);

export const siteRuleSettings = sqliteTable("site_rule_settings", {
  siteId: text("site_id")
    .primaryKey()
    .references(() => sites.id, { onDelete: "cascade" }),
  settingsJson: text("settings_json").notNull(),
  updatedAt: integer("updated_at").notNull().default(wallNow),
  updatedBy: text("updated_by").references(() => users.id),
});

/** Who is on call when: a primary and a backup per shift (a day or a week). */
export const onCallShifts = sqliteTable(
  "on_call_shifts",
  {
    id: text("id").primaryKey(),
    startsAt: integer("starts_at").notNull(),
    endsAt: integer("ends_at").notNull(),
    primaryUserId: text("primary_user_id")
      .notNull()
      .references(() => users.id),
    backupUserId: text("backup_user_id").references(() => users.id),
  },
  (t) => [index("on_call_shifts_time_idx").on(t.startsAt, t.endsAt)],
);

/** One e-mail sent for an alarm activation, step 0 = primary, 1 = backup, 2 = admins. */
export const alarmNotifications = sqliteTable(
  "alarm_notifications",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    alarmId: text("alarm_id")
      .notNull()
      .references(() => alarms.id, { onDelete: "cascade" }),
    activation: integer("activation").notNull(),
    step: integer("step").notNull(),
    userId: text("user_id")
      .notNull()
      .references(() => users.id),
    email: text("email").notNull(),
    sentAt: integer("sent_at").notNull(),
  },
  (t) => [uniqueIndex("alarm_notifications_unique").on(t.alarmId, t.activation, t.step, t.userId)],
);

/** Single-use acknowledge links: the e-mailed token's hash, its expiry and when it was used. */
export const ackLinks = sqliteTable("ack_links", {
  id: text("id").primaryKey(),
  alarmId: text("alarm_id")
    .notNull()
    .references(() => alarms.id, { onDelete: "cascade" }),
  userId: text("user_id")
    .notNull()
    .references(() => users.id),
  expiresAt: integer("expires_at").notNull(),
  usedAt: integer("used_at"),
});

/** Mail caught by the local SMTP sink when no SMTP_URL is configured (the admin's outbox). */
export const mailMessages = sqliteTable(
  "mail_messages",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    fromAddress: text("from_address").notNull(),
    toAddress: text("to_address").notNull(),
    subject: text("subject").notNull(),
    text: text("text").notNull(),
    receivedAt: integer("received_at").notNull().default(wallNow),
  },
  (t) => [index("mail_messages_to_idx").on(t.toAddress)],
);
