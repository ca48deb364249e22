import { sql } from "drizzle-orm";
import { index, integer, primaryKey, real, sqliteTable, text } from "drizzle-orm/sqlite-core";
import { alarms } from "./alarms";
import { equipment, sites, users } from "./core";

// The service call on record: customers' service requests, technicians' visits with their running
// log, the temporary changes made to get a plant going, uploaded files, and the refrigerant log.
// refrigerant_log is append-only (triggers in the migration): corrections are new entries.

const createdAt = () =>
  integer("created_at", { mode: "timestamp_ms" })
    .notNull()
    .default(sql`(unixepoch('subsec') * 1000)`);
const ms = (name: string) => integer(name, { mode: "timestamp_ms" });

export const serviceRequestUrgencies = ["not_urgent", "today", "now"] as const;
export const serviceRequestStates = ["received", "assigned", "on_the_way", "done", "cancelled"] as const;

/** A customer asking for service, in their own words. */
export const serviceRequests = sqliteTable(
  "service_requests",
  {
    id: text("id").primaryKey(),
    siteId: text("site_id")
      .notNull()
      .references(() => sites.id),
    requestedBy: text("requested_by")
      .notNull()
      .references(() => users.id),
    description: text("description").notNull(),
    urgency: text("urgency", { enum: serviceRequestUrgencies }).notNull(),
    callbackPhone: text("callback_phone").notNull(),
    state: text("state", { enum: serviceRequestStates }).notNull().default("received"),
    assignedTo: text("assigned_to").references(() => users.id),
    createdAt: createdAt(),
    updatedAt: ms("updated_at").notNull(),
  },
  (t) => [index("service_requests_site_idx").on(t.siteId, t.state)],
);

export const visitModes = ["on_site", "remote"] as const;
export const visitOrigins = ["alarm", "service_request", "planned"] as const;

export const visits = sqliteTable(
  "visits",
  {
    id: text("id").primaryKey(),
    siteId: text("site_id")
      .notNull()
      .references(() => sites.id),
    technicianId: text("technician_id")
      .notNull()
      .references(() => users.id),
    mode: text("mode", { enum: visitModes }).notNull(),
    origin: text("origin", { enum: visitOrigins }).notNull(),
    serviceRequestId: text("service_request_id").references(() => serviceRequests.id),
    openedAt: ms("opened_at").notNull(),
    /** On site: arrival and departure. Remote: start and end of the remote session. */
    arrivedAt: ms("arrived_at"),
    departedAt: ms("departed_at"),
    closedAt: ms("closed_at"),
    summary: text("summary"),
    partsUsed: text("parts_used", { mode: "json" }).$type<{ part: string; quantity: number }[]>().notNull().default([]),
    /** The plant's key numbers (derived values and the points the rules use) at opening and closing. */
    openSnapshot: text("open_snapshot", { mode: "json" }).$type<unknown>(),
    closeSnapshot: text("close_snapshot", { mode: "json" }).$type<unknown>(),
    /** Why the visit closed with temporary changes still in place, and who will put them back. */
    openChangesNote: text("open_changes_note"),
    openChangesOwner: text("open_changes_owner").references(() => users.id),
    createdAt: createdAt(),
  },
  (t) => [index("visits_site_idx").on(t.siteId, t.openedAt)],
);

export const visitAlarms = sqliteTable(
  "visit_alarms",
  {
    visitId: text("visit_id")
      .notNull()
      .references(() => visits.id, { onDelete: "cascade" }),
    alarmId: text("alarm_id")
      .notNull()
      .references(() => alarms.id),
  },
  (t) => [primaryKey({ columns: [t.visitId, t.alarmId] }), index("visit_alarms_alarm_idx").on(t.alarmId)],
);

/** The running log of findings and actions: short entries with times. */
export const visitEntries = sqliteTable(
  "visit_entries",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    visitId: text("visit_id")
      .notNull()
      .references(() => visits.id, { onDelete: "cascade" }),
    at: ms("at").notNull(),
    authorId: text("author_id")
      .notNull()
      .references(() => users.id),
    text: text("text").notNull(),
    fileId: text("file_id").references(() => storedFiles.id),
  },
  (t) => [index("visit_entries_visit_idx").on(t.visitId, t.at)],
);

export const temporaryChangeKinds = [
  "controller_setting",
  "safety_bypassed",
  "drive_in_hand_or_off",
  "load_shed",
  "valve_by_hand",
  "other",
] as const;

/** A change made to get a plant going that must be put back. */
export const temporaryChanges = sqliteTable(
  "temporary_changes",
  {
    id: text("id").primaryKey(),
    visitId: text("visit_id")
      .notNull()
      .references(() => visits.id),
    siteId: text("site_id")
      .notNull()
      .references(() => sites.id),
    equipmentId: text("equipment_id").references(() => equipment.id),
    kind: text("kind", { enum: temporaryChangeKinds }).notNull(),
    /** What was changed, e.g. "start-to-start timer" or a quantity key the live points carry. */
    what: text("what").notNull(),
    /** A quantity key of lib/quantities.ts when a live point shows the setting, to check the put-back. */
    pointQuantity: text("point_quantity"),
    fromValue: text("from_value").notNull(),
    toValue: text("to_value").notNull(),
    reason: text("reason").notNull(),
    madeBy: text("made_by")
      .notNull()
      .references(() => users.id),
    madeAt: ms("made_at").notNull(),
    putBackDueAt: ms("put_back_due_at").notNull(),
    putBackAt: ms("put_back_at"),
    putBackBy: text("put_back_by").references(() => users.id),
    valueNow: text("value_now"),
    lastRemindedAt: ms("last_reminded_at"),
    reminders: integer("reminders").notNull().default(0),
    escalatedAt: ms("escalated_at"),
  },
  (t) => [index("temporary_changes_site_idx").on(t.siteId, t.putBackAt)],
);

/** Uploaded photos and PDFs; the bytes live in file storage under `storageKey`. */
export const storedFiles = sqliteTable(
  "stored_files",
  {
    id: text("id").primaryKey(),
    siteId: text("site_id")
      .notNull()
      .references(() => sites.id),
    visitId: text("visit_id"),
    serviceRequestId: text("service_request_id"),
    uploadedBy: text("uploaded_by")
      .notNull()
      .references(() => users.id),
    /** From the content, never the name. */
    mediaType: text("media_type").notNull(),
    bytes: integer("bytes").notNull(),
    storageKey: text("storage_key").notNull(),
    thumbnailKey: text("thumbnail_key"),
    originalName: text("original_name").notNull(),
    caption: text("caption").notNull().default(""),
    sharedWithCustomer: integer("shared_with_customer", { mode: "boolean" }).notNull().default(false),
    createdAt: createdAt(),
  },
  (t) => [index("stored_files_site_idx").on(t.siteId), index("stored_files_visit_idx").on(t.visitId)],
);

export const refrigerantEntryKinds = ["added", "recovered", "leak_check", "full_charge", "correction"] as const;

/** Refrigerant handled per chiller, append-only: a mistake is corrected by a new entry that names it. */
export const refrigerantLog = sqliteTable(
  "refrigerant_log",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    equipmentId: text("equipment_id")
      .notNull()
      .references(() => equipment.id),
    siteId: text("site_id")
      .notNull()
      .references(() => sites.id),
    visitId: text("visit_id").references(() => visits.id),
    at: ms("at").notNull(),
    kind: text("kind", { enum: refrigerantEntryKinds }).notNull(),
    /** kg; positive. For a correction, the signed change to the entry it corrects. */
    amountKg: real("amount_kg"),
    cylinder: text("cylinder"),
    reason: text("reason").notNull(),
    /** Leak check: `no_leak` or `leak_found`. */
    result: text("result"),
    correctsId: integer("corrects_id"),
    byUser: text("by_user")
      .notNull()
      .references(() => users.id),
    recordedAt: createdAt(),
  },
  (t) => [index("refrigerant_log_equipment_idx").on(t.equipmentId, t.at)],
);

/** A customer's report sent for a visit: to whom and when (the PDF is rendered from the visit). */
export const visitReports = sqliteTable(
  "visit_reports",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    visitId: text("visit_id")
      .notNull()
      .references(() => visits.id),
    sentAt: ms("sent_at").notNull(),
    sentBy: text("sent_by")
      .notNull()
      .references(() => users.id),
    recipients: text("recipients", { mode: "json" }).$type<string[]>().notNull(),
  },
  (t) => [index("visit_reports_visit_idx").on(t.visitId)],
);
