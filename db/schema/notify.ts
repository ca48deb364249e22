import { sql } from "drizzle-orm";
import { index, integer, sqliteTable, text } from "drizzle-orm/sqlite-core";
import { alarms } from "./alarms";
import { users } from "./core";

// Reaching people: phones' push subscriptions, verified SMS numbers, escalation by priority,
// every notification sent on every path, private calendar feeds, and people's own choices.

const createdAt = () =>
  integer("created_at", { mode: "timestamp_ms" })
    .notNull()
    .default(sql`(unixepoch('subsec') * 1000)`);
const ms = (name: string) => integer(name, { mode: "timestamp_ms" });

/** One Web Push subscription per device (RFC 8030 endpoint with its RFC 8291 keys). */
export const pushSubscriptions = sqliteTable(
  "push_subscriptions",
  {
    id: text("id").primaryKey(),
    userId: text("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    endpoint: text("endpoint").notNull().unique(),
    p256dh: text("p256dh").notNull(),
    auth: text("auth").notNull(),
    /** What the person calls the device ("work phone"). */
    label: text("label").notNull(),
    createdAt: createdAt(),
    lastSuccessAt: ms("last_success_at"),
  },
  (t) => [index("push_subscriptions_user_idx").on(t.userId)],
);

/** A person's mobile number for alarm texts, verified by a code sent to it. */
export const smsNumbers = sqliteTable("sms_numbers", {
  userId: text("user_id")
    .primaryKey()
    .references(() => users.id, { onDelete: "cascade" }),
  /** E.164. */
  phone: text("phone").notNull(),
  verifiedAt: ms("verified_at"),
  codeHash: text("code_hash"),
  codeExpiresAt: ms("code_expires_at"),
  codeAttempts: integer("code_attempts").notNull().default(0),
  alarmsEnabled: integer("alarms_enabled", { mode: "boolean" }).notNull().default(false),
});

export const notificationPaths = ["push", "sms", "email"] as const;
export type NotificationPath = (typeof notificationPaths)[number];

/** Per alarm priority (1 critical … 4 low): the paths used and when the backup and the admins hear. */
export const escalationPolicies = sqliteTable("escalation_policies", {
  priority: integer("priority").primaryKey(),
  paths: text("paths", { mode: "json" }).$type<NotificationPath[]>().notNull(),
  /** Null: never escalate to them. */
  backupAfterS: integer("backup_after_s"),
  adminsAfterS: integer("admins_after_s"),
  updatedBy: text("updated_by").references(() => users.id),
  updatedAt: ms("updated_at").notNull(),
});

export const deliveryStatuses = ["sent", "delivered", "failed", "acknowledged"] as const;

/** Every notification on every path, and what became of it. */
export const alarmDeliveries = sqliteTable(
  "alarm_deliveries",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    alarmId: text("alarm_id")
      .notNull()
      .references(() => alarms.id, { onDelete: "cascade" }),
    activation: integer("activation").notNull(),
    /** 0 primary, 1 backup, 2 admins. */
    step: integer("step").notNull(),
    userId: text("user_id")
      .notNull()
      .references(() => users.id),
    path: text("path", { enum: notificationPaths }).notNull(),
    /** Push subscription id, phone number or e-mail address. */
    target: text("target").notNull(),
    status: text("status", { enum: deliveryStatuses }).notNull(),
    detail: text("detail"),
    sentAt: ms("sent_at").notNull(),
    statusAt: ms("status_at").notNull(),
  },
  (t) => [index("alarm_deliveries_alarm_idx").on(t.alarmId, t.activation)],
);

/** A private, revocable calendar feed of one person's on-call shifts. */
export const calendarFeeds = sqliteTable(
  "calendar_feeds",
  {
    id: text("id").primaryKey(),
    userId: text("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    tokenHash: text("token_hash").notNull().unique(),
    createdAt: createdAt(),
    revokedAt: ms("revoked_at"),
  },
  (t) => [index("calendar_feeds_user_idx").on(t.userId)],
);

/** What a person chose to hear about beyond on-call duty (customers: their own sites). */
export const notificationPreferences = sqliteTable("notification_preferences", {
  userId: text("user_id")
    .primaryKey()
    .references(() => users.id, { onDelete: "cascade" }),
  alarmStartEndMail: integer("alarm_start_end_mail", { mode: "boolean" }).notNull().default(false),
  serviceRequestMail: integer("service_request_mail", { mode: "boolean" }).notNull().default(false),
});

/** Text messages the local fake SMS provider accepted (development and tests), for the admin's outbox. */
export const smsSinkMessages = sqliteTable("sms_sink_messages", {
  id: integer("id").primaryKey({ autoIncrement: true }),
  direction: text("direction", { enum: ["outbound", "inbound"] }).notNull(),
  fromNumber: text("from_number").notNull(),
  toNumber: text("to_number").notNull(),
  body: text("body").notNull(),
  receivedAt: createdAt(),
});
