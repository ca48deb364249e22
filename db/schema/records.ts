import { sql } from "drizzle-orm";
import { index, integer, primaryKey, real, sqliteTable, text } from "drizzle-orm/sqlite-core";
import { equipment, users } from "./core";

// What administrators change and who changed it: entered equipment limits, the audit trail,
// and single-use account links (invitations, password resets).

const createdAt = () =>
  integer("created_at", { mode: "timestamp_ms" })
    .notNull()
    .default(sql`(unixepoch('subsec') * 1000)`);

/**
 * A limit or setting taken from the nameplate or the controller. A limit without a row here is
 * the default derived from the refrigerant and the compressor (lib/plant/equipment-limits.ts).
 */
export const equipmentLimits = sqliteTable(
  "equipment_limits",
  {
    equipmentId: text("equipment_id")
      .notNull()
      .references(() => equipment.id, { onDelete: "cascade" }),
    /** A key of lib/plant/equipment-limits.ts, in that key's canonical unit. */
    key: text("key").notNull(),
    value: real("value").notNull(),
    setBy: text("set_by").references(() => users.id),
    setAt: integer("set_at", { mode: "timestamp_ms" }).notNull(),
  },
  (t) => [primaryKey({ columns: [t.equipmentId, t.key] })],
);
export type EquipmentLimitRow = typeof equipmentLimits.$inferSelect;

export const auditEntityTypes = [
  "customer",
  "site",
  "equipment",
  "limit",
  "point",
  "person",
  "gateway",
  "token",
  "rule_settings",
  "service_request",
  "visit",
  "temporary_change",
  "file",
  "escalation_policy",
  "incident",
  "drill",
] as const;
export type AuditEntityType = (typeof auditEntityTypes)[number];

/** Every administrative change; append-only (triggers in the migration refuse UPDATE and DELETE). */
export const auditLog = sqliteTable(
  "audit_log",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    at: integer("at", { mode: "timestamp_ms" }).notNull(),
    /** Null for the system itself (the demo seed, a migration). */
    actorId: text("actor_id"),
    /** The actor's name when it acted, so the entry reads the same after a rename. */
    actorName: text("actor_name").notNull(),
    /** `create`, `update`, `retire`, `restore`, `invite`, `disable`… */
    action: text("action").notNull(),
    entityType: text("entity_type", { enum: auditEntityTypes }).notNull(),
    entityId: text("entity_id").notNull(),
    /** The site the change belongs to, when it belongs to one (filters). */
    siteId: text("site_id"),
    summary: text("summary").notNull(),
    before: text("before", { mode: "json" }).$type<unknown>(),
    after: text("after", { mode: "json" }).$type<unknown>(),
  },
  (t) => [
    index("audit_log_at_idx").on(t.at),
    index("audit_log_entity_idx").on(t.entityType, t.entityId),
    index("audit_log_site_idx").on(t.siteId),
  ],
);
export type AuditRow = typeof auditLog.$inferSelect;

/** Single-use, expiring links mailed to a person: set a first password, or reset a forgotten one. */
export const accountLinks = sqliteTable(
  "account_links",
  {
    id: text("id").primaryKey(),
    userId: text("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    purpose: text("purpose", { enum: ["invite", "reset"] }).notNull(),
    /** SHA-256 of the secret in the link; the secret itself is only in the e-mail. */
    tokenHash: text("token_hash").notNull().unique(),
    createdAt: createdAt(),
    expiresAt: integer("expires_at", { mode: "timestamp_ms" }).notNull(),
    usedAt: integer("used_at", { mode: "timestamp_ms" }),
  },
  (t) => [index("account_links_user_idx").on(t.userId)],
);
