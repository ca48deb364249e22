import { sql } from "drizzle-orm";
import { index, integer, primaryKey, real, sqliteTable, text, uniqueIndex } from "drizzle-orm/sqlite-core";
import { gatewayProtocols, gatewayStates, type GatewayProtocol, type GatewayState } from "../../lib/dto/gateways";
import { points, sites } from "./core";

// Site gateways, their point maps, and the readings they deliver.
// `readings`, `readings_1m` and `readings_1h` are WITHOUT ROWID tables (custom migrations):
// their primary key is the only index they need, and the rows are stored in it.

const createdAt = () =>
  integer("created_at", { mode: "timestamp_ms" })
    .notNull()
    .default(sql`(unixepoch('subsec') * 1000)`);

export { gatewayProtocols, gatewayStates, type GatewayProtocol, type GatewayState };

export const gateways = sqliteTable(
  "gateways",
  {
    /** Also the MQTT user name and the `{gatewayId}` topic level, so broker ACLs can use it. */
    id: text("id").primaryKey(),
    siteId: text("site_id")
      .notNull()
      .references(() => sites.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    protocol: text("protocol", { enum: gatewayProtocols }).notNull(),
    /** Sparkplug B group and edge node ids (null for the JSON protocol). */
    groupId: text("group_id"),
    edgeNodeId: text("edge_node_id"),
    username: text("username").notNull(),
    /**
     * scrypt hash (older rows: bcrypt, until their first CONNECT); the password itself is shown
     * once at provisioning or rotation.
     */
    passwordHash: text("password_hash").notNull(),
    createdAt: createdAt(),
    passwordRotatedAt: integer("password_rotated_at", { mode: "timestamp_ms" }),
    revokedAt: integer("revoked_at", { mode: "timestamp_ms" }),
    /** Last presence signal: connect/disconnect, status topic, NBIRTH/NDEATH. */
    state: text("state", { enum: gatewayStates }).notNull().default("unknown"),
    stateChangedAt: integer("state_changed_at", { mode: "timestamp_ms" }),
    lastMessageAt: integer("last_message_at", { mode: "timestamp_ms" }),
    messages: integer("messages").notNull().default(0),
    readingsAccepted: integer("readings_accepted").notNull().default(0),
    /** Redelivered readings already stored (QoS 1 duplicates); not an error. */
    readingsDuplicate: integer("readings_duplicate").notNull().default(0),
  },
  (t) => [
    uniqueIndex("gateways_username_unique").on(t.username),
    uniqueIndex("gateways_sparkplug_unique").on(t.groupId, t.edgeNodeId),
    index("gateways_site_idx").on(t.siteId),
  ],
);
export type Gateway = typeof gateways.$inferSelect;
export type NewGateway = typeof gateways.$inferInsert;

/** Rejected input per gateway and reason (see gateway/contract.ts for the reasons). */
export const gatewayRejections = sqliteTable(
  "gateway_rejections",
  {
    gatewayId: text("gateway_id")
      .notNull()
      .references(() => gateways.id, { onDelete: "cascade" }),
    reason: text("reason").notNull(),
    count: integer("count").notNull().default(0),
    lastAt: integer("last_at", { mode: "timestamp_ms" }).notNull(),
  },
  (t) => [primaryKey({ columns: [t.gatewayId, t.reason] })],
);

/** Point names a gateway sent that its point map does not know. */
export const gatewayUnmappedPoints = sqliteTable(
  "gateway_unmapped_points",
  {
    gatewayId: text("gateway_id")
      .notNull()
      .references(() => gateways.id, { onDelete: "cascade" }),
    pointName: text("point_name").notNull(),
    count: integer("count").notNull().default(0),
    lastSeenAt: integer("last_seen_at", { mode: "timestamp_ms" }).notNull(),
  },
  (t) => [primaryKey({ columns: [t.gatewayId, t.pointName] })],
);

/** A gateway's own point name → a Liftline point, with the unit the gateway sends it in. */
export const gatewayPointMaps = sqliteTable(
  "gateway_point_maps",
  {
    gatewayId: text("gateway_id")
      .notNull()
      .references(() => gateways.id, { onDelete: "cascade" }),
    gatewayPoint: text("gateway_point").notNull(),
    pointId: integer("point_id")
      .notNull()
      .references(() => points.id, { onDelete: "cascade" }),
    /** A wire unit code of lib/units.ts. */
    unit: text("unit").notNull(),
  },
  (t) => [primaryKey({ columns: [t.gatewayId, t.gatewayPoint] }), index("gateway_point_maps_point_idx").on(t.pointId)],
);

/**
 * Raw readings in canonical units, event time in ms. Numbers and booleans (0/1) in
 * `value`, state and text points in `text`. quality: 0 good, 1 uncertain, 2 bad.
 */
export const readings = sqliteTable(
  "readings",
  {
    pointId: integer("point_id")
      .notNull()
      .references(() => points.id, { onDelete: "cascade" }),
    ts: integer("ts").notNull(),
    value: real("value"),
    text: text("text"),
    quality: integer("quality").notNull().default(0),
  },
  (t) => [primaryKey({ columns: [t.pointId, t.ts] })],
);

/** The columns of a rollup table: one row per point and bucket; avg = sum / count. */
const rollupTable = (name: "readings_1m" | "readings_1h") =>
  sqliteTable(
    name,
    {
      pointId: integer("point_id")
        .notNull()
        .references(() => points.id, { onDelete: "cascade" }),
      /** Start of the bucket (minute or hour), ms. */
      bucket: integer("bucket").notNull(),
      min: real("min").notNull(),
      max: real("max").notNull(),
      sum: real("sum").notNull(),
      count: integer("count").notNull(),
      last: real("last").notNull(),
      lastTs: integer("last_ts").notNull(),
    },
    (t) => [primaryKey({ columns: [t.pointId, t.bucket] })],
  );

/** 1-minute rollups of numeric readings, written when their minute closes (gateway/rollups.ts). */
export const readings1m = rollupTable("readings_1m");

/**
 * 1-hour rollups, kept beside the minutes so a month-long trend reads 720 rows instead of
 * 43,200. Each minute written is added to its hour in the same transaction.
 */
export const readings1h = rollupTable("readings_1h");

/** The newest reading per point (by event time), so pages never scan `readings`. */
export const latestValues = sqliteTable("latest_values", {
  pointId: integer("point_id")
    .primaryKey()
    .references(() => points.id, { onDelete: "cascade" }),
  ts: integer("ts").notNull(),
  value: real("value"),
  text: text("text"),
  quality: integer("quality").notNull().default(0),
  gatewayId: text("gateway_id"),
  receivedAt: integer("received_at").notNull(),
});

/**
 * Ingestion bookkeeping that must outlive the process: `rollups_sealed_before` (every stored
 * reading of an earlier minute is in `readings_1m`) and `closed_cleanly` (0 while running).
 */
export const ingestState = sqliteTable("ingest_state", {
  key: text("key").primaryKey(),
  value: integer("value").notNull(),
});
