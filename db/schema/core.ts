import { sql } from "drizzle-orm";
import { index, integer, real, sqliteTable, text, uniqueIndex } from "drizzle-orm/sqlite-core";

// Tenancy and the physical plant. Readings, gateways and alarms live in their own schema files.

const createdAt = () =>
  integer("created_at", { mode: "timestamp_ms" })
    .notNull()
    .default(sql`(unixepoch('subsec') * 1000)`);

/** Soft delete: a retired row keeps its history and is hidden, with who retired it and when. */
const retired = () => ({
  retiredAt: integer("retired_at", { mode: "timestamp_ms" }),
  retiredBy: text("retired_by"),
});

/** One person to call about a site. */
export interface SiteContact {
  name: string;
  role: string;
  phone: string;
  email: string;
}

export const organizations = sqliteTable("organizations", {
  id: text("id").primaryKey(),
  name: text("name").notNull(),
  /** `service` is the contractor running Liftline; `customer` owns buildings. */
  kind: text("kind", { enum: ["service", "customer"] }).notNull(),
  createdAt: createdAt(),
  ...retired(),
});
export type Organization = typeof organizations.$inferSelect;
export type NewOrganization = typeof organizations.$inferInsert;

export const users = sqliteTable(
  "users",
  {
    id: text("id").primaryKey(),
    email: text("email").notNull(),
    name: text("name").notNull(),
    passwordHash: text("password_hash").notNull(),
    role: text("role", { enum: ["admin", "technician", "customer"] }).notNull(),
    organizationId: text("organization_id")
      .notNull()
      .references(() => organizations.id),
    unitSystem: text("unit_system", { enum: ["ip", "si"] })
      .notNull()
      .default("ip"),
    disabled: integer("disabled", { mode: "boolean" }).notNull().default(false),
    phone: text("phone"),
    /** Set when the person first chose a password (an invited account has none until then). */
    passwordSetAt: integer("password_set_at", { mode: "timestamp_ms" }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("users_email_unique").on(t.email)],
);
export type User = typeof users.$inferSelect;
export type NewUser = typeof users.$inferInsert;

export const sites = sqliteTable(
  "sites",
  {
    id: text("id").primaryKey(),
    name: text("name").notNull(),
    /** The customer organization that owns the building. */
    organizationId: text("organization_id")
      .notNull()
      .references(() => organizations.id),
    kind: text("kind").notNull(),
    address: text("address").notNull(),
    timeZone: text("time_zone").notNull(),
    contacts: text("contacts", { mode: "json" }).$type<SiteContact[]>().notNull().default([]),
    /** What a technician needs after hours: where the gate code is, plant-room access, who to call. */
    accessNotes: text("access_notes").notNull().default(""),
    /** A simulated plant that exists only for drills: it never pages anyone and no customer sees it. */
    training: integer("training", { mode: "boolean" }).notNull().default(false),
    createdAt: createdAt(),
    ...retired(),
  },
  (t) => [index("sites_organization_idx").on(t.organizationId)],
);
export type Site = typeof sites.$inferSelect;
export type NewSite = typeof sites.$inferInsert;

export const equipmentKinds = ["chiller", "cooling_tower", "pump", "air_handler", "weather_station"] as const;

export const equipment = sqliteTable(
  "equipment",
  {
    id: text("id").primaryKey(),
    siteId: text("site_id")
      .notNull()
      .references(() => sites.id, { onDelete: "cascade" }),
    tag: text("tag").notNull(),
    name: text("name").notNull(),
    kind: text("kind", { enum: equipmentKinds }).notNull(),
    /** Nominal capacity in refrigeration tons for chillers and towers. */
    capacityTons: real("capacity_tons"),
    /** Design water flow in L/s (pumps, chiller barrels). */
    designFlowLps: real("design_flow_lps"),
    refrigerant: text("refrigerant"),
    /** The tag of the equipment this one serves (a pump serving CH-1). */
    serves: text("serves"),
    /** The rest of the kind's record (lib/schemas/equipment.ts): design data and nameplate facts. */
    record: text("record", { mode: "json" }).$type<Record<string, unknown>>().notNull().default({}),
    createdAt: createdAt(),
    ...retired(),
  },
  (t) => [uniqueIndex("equipment_site_tag_unique").on(t.siteId, t.tag)],
);
export type Equipment = typeof equipment.$inferSelect;
export type NewEquipment = typeof equipment.$inferInsert;

export const points = sqliteTable(
  "points",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    equipmentId: text("equipment_id")
      .notNull()
      .references(() => equipment.id, { onDelete: "cascade" }),
    /** Unique within its equipment; normally the quantity key. */
    key: text("key").notNull(),
    /** A key of lib/quantities.ts. */
    quantity: text("quantity").notNull(),
    /** Canonical SI unit the value is stored in. */
    unit: text("unit").notNull(),
    brickClass: text("brick_class").notNull(),
    expectedIntervalS: integer("expected_interval_s").notNull().default(5),
    lowLimit: real("low_limit"),
    highLimit: real("high_limit"),
  },
  (t) => [uniqueIndex("points_equipment_key_unique").on(t.equipmentId, t.key)],
);
export type Point = typeof points.$inferSelect;
export type NewPoint = typeof points.$inferInsert;

export const apiTokens = sqliteTable(
  "api_tokens",
  {
    id: text("id").primaryKey(),
    userId: text("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    /** SHA-256 of the secret; the secret itself is shown once and never stored. */
    tokenHash: text("token_hash").notNull(),
    /** First characters of the token so a user can tell tokens apart. */
    prefix: text("prefix").notNull(),
    createdAt: createdAt(),
    lastUsedAt: integer("last_used_at", { mode: "timestamp_ms" }),
    revokedAt: integer("revoked_at", { mode: "timestamp_ms" }),
    /** Refused from this moment on; null for a token that does not expire. */
    expiresAt: integer("expires_at", { mode: "timestamp_ms" }),
    /** `read` < `act` < `admin`; a token never does more than its owner's role allows either. */
    scope: text("scope", { enum: ["read", "act", "admin"] })
      .notNull()
      .default("act"),
  },
  (t) => [uniqueIndex("api_tokens_hash_unique").on(t.tokenHash), index("api_tokens_user_idx").on(t.userId)],
);
export type ApiToken = typeof apiTokens.$inferSelect;

/**
 * One row per browser sign-in; the session cookie (a sealed JWT) carries the id. Signing out sets
 * `revoked_at`, so a copied cookie stops working before the token itself expires (OWASP ASVS 5.0 §7.4.1).
 */
export const sessions = sqliteTable(
  "sessions",
  {
    id: text("id").primaryKey(),
    userId: text("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    createdAt: createdAt(),
    lastSeenAt: integer("last_seen_at", { mode: "timestamp_ms" }).notNull(),
    revokedAt: integer("revoked_at", { mode: "timestamp_ms" }),
  },
  (t) => [index("sessions_user_idx").on(t.userId)],
);
