import { z } from "zod";
import { qualityNames, type Quality } from "@/lib/quality";
import { MAX_POINT_NAME } from "@/lib/point-map-csv";

// The Liftline JSON wire contract (gateway/PROTOCOL.md is its public description) and the
// limits every message is held to, whatever the protocol.

export const TOPIC_ROOT = "liftline";
/** Sparkplug B 3.0 §4.1.1: the namespace element of every Sparkplug B topic. */
export const SPARKPLUG_NAMESPACE = "spBv1.0";

export const MAX_PAYLOAD_BYTES = 256 * 1024;
/** The largest MQTT packet (remaining length) the broker reads; a larger one closes the connection. */
export const MAX_PACKET_BYTES = 4 * MAX_PAYLOAD_BYTES;
/** The largest CONNECT (remaining length): ids, credentials and a will fit in far less. */
export const MAX_CONNECT_BYTES = 4096;
/** The largest retained payload a gateway may leave on the broker (its status is 6 or 7 bytes). */
export const MAX_RETAINED_BYTES = 256;
/** A gateway's keep alive must be 1..MAX_KEEPALIVE_S seconds, so a dead connection is noticed. */
export const MAX_KEEPALIVE_S = 300;
export const MAX_READINGS_PER_MESSAGE = 5000;
export const MAX_FUTURE_MS = 5 * 60_000;
export { MAX_POINT_NAME };
export const MAX_TEXT_VALUE = 200;

/** Why input was not stored. Message-level reasons count messages, the others count readings. */
export const rejectionReasons = [
  "too_large", // message: payload over MAX_PAYLOAD_BYTES
  "malformed_json", // message: not JSON (NaN and Infinity are not JSON either)
  "invalid_message", // message: envelope does not match the contract
  "bad_topic", // message: a topic of its own namespace the contract does not define
  "foreign_topic", // message: a topic of another gateway (the connection is closed, MQTT 3.1.1 §3.3.5)
  "rate_limited", // message: more messages per second than a gateway may send
  "sparkplug_decode", // message: not a Sparkplug B protobuf payload
  "sparkplug_no_birth", // message: DATA before any BIRTH (a rebirth is requested)
  "invalid_reading", // reading: wrong shape or type
  "wrong_type", // reading: a value the mapped point cannot hold (text for a temperature)
  "out_of_range", // reading: a number outside its measure's plausible range (lib/quantities.ts)
  "future_timestamp", // reading: more than 5 minutes ahead of the server clock
  "too_old", // reading: older than raw retention
  "unmapped_point", // reading: the point map has no such name (also listed by name)
  "unknown_alias", // reading: a Sparkplug alias no BIRTH declared
] as const;
export type RejectionReason = (typeof rejectionReasons)[number];

const isoTime = z.iso.datetime({ offset: true });

/** One reading as sent. `value` is checked against the mapped point later. */
export const readingSchema = z.strictObject({
  point: z.string().min(1).max(MAX_POINT_NAME),
  value: z.union([z.number(), z.boolean(), z.string().max(MAX_TEXT_VALUE)]),
  ts: isoTime.optional(),
  quality: z.enum(qualityNames).optional(),
});
export type WireReading = z.infer<typeof readingSchema>;

// The same RegExp object zod tests `ts` against, so the fast path cannot drift from it.
const isoPattern: RegExp | undefined = isoTime._zod.def.pattern;
const qualityNameSet: ReadonlySet<unknown> = new Set(qualityNames);

const DAYS_IN_MONTH = [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];
const digit = (s: string, i: number) => {
  const c = s.charCodeAt(i) - 48;
  return c >= 0 && c <= 9 ? c : NaN;
};
const num2 = (s: string, i: number) => digit(s, i) * 10 + digit(s, i + 1);

/**
 * Event time of `2026-12-01T14:02:59.500Z`, the form gateways and JavaScript's toISOString
 * write, read by hand, as the general pattern below and Date.parse are too slow per reading;
 * NaN when `ts` is not exactly that form of a real UTC date and time.
 */
export function canonicalIsoMs(ts: string): number {
  if (
    ts.length !== 24 ||
    ts[4] !== "-" ||
    ts[7] !== "-" ||
    ts[10] !== "T" ||
    ts[13] !== ":" ||
    ts[16] !== ":" ||
    ts[19] !== "." ||
    ts[23] !== "Z"
  )
    return NaN;
  const year = num2(ts, 0) * 100 + num2(ts, 2);
  const month = num2(ts, 5);
  const day = num2(ts, 8);
  const hour = num2(ts, 11);
  const minute = num2(ts, 14);
  const second = num2(ts, 17);
  const ms = num2(ts, 20) * 10 + digit(ts, 22);
  if (!(month >= 1 && month <= 12 && hour <= 23 && minute <= 59 && second <= 59 && ms >= 0)) return NaN;
  const leap = year % 4 === 0 && (year % 100 !== 0 || year % 400 === 0);
  if (!(day >= 1 && day <= (month === 2 && leap ? 29 : DAYS_IN_MONTH[month - 1]))) return NaN;
  return Date.UTC(year, month - 1, day, hour, minute, second, ms);
}

/**
 * A cheaper check for the common, valid reading: returns the reading only when
 * `readingSchema` would accept it as is, and undefined when in doubt — the caller then asks
 * `readingSchema` for the verdict, so what is rejected (and why) stays zod's decision.
 * A safeParse per reading is too slow for the ingest path. `out.tsMs` gets the
 * reading's event time (NaN when it has no `ts`), so it is not parsed twice.
 */
export function fastReading(raw: unknown, out: { tsMs: number }): WireReading | undefined {
  if (typeof raw !== "object" || raw === null || Array.isArray(raw)) return undefined;
  const r = raw as Record<string, unknown>;
  let keys = 0;
  for (const k in r) {
    if (k !== "point" && k !== "value" && k !== "ts" && k !== "quality") return undefined;
    keys++;
  }
  const { point, value, ts, quality } = r;
  if (typeof point !== "string" || point.length < 1 || point.length > MAX_POINT_NAME) return undefined;
  if (typeof value === "number") {
    if (!Number.isFinite(value)) return undefined;
  } else if (typeof value === "string") {
    if (value.length > MAX_TEXT_VALUE) return undefined;
  } else if (typeof value !== "boolean") return undefined;
  let present = 2;
  out.tsMs = NaN;
  if (ts !== undefined) {
    if (typeof ts !== "string") return undefined;
    out.tsMs = canonicalIsoMs(ts);
    if (Number.isNaN(out.tsMs)) {
      if (!isoPattern || !isoPattern.test(ts)) return undefined;
      out.tsMs = Date.parse(ts);
    }
    present++;
  } else if ("ts" in r) return undefined;
  if (quality !== undefined) {
    if (!qualityNameSet.has(quality)) return undefined;
    present++;
  } else if ("quality" in r) return undefined;
  // Every own key was one of the four and each present key was checked.
  if (keys !== present) return undefined;
  return r as WireReading;
}

/**
 * The envelope on `liftline/{gatewayId}/readings`. Readings are validated one by one so a
 * bad reading never costs the good ones beside it.
 */
export const readingsMessageSchema = z.object({
  seq: z.number().int().min(0).optional(),
  sentAt: isoTime,
  readings: z.array(z.unknown()).max(MAX_READINGS_PER_MESSAGE),
});

/** Retained payload of `liftline/{gatewayId}/status` (also the gateway's last will). */
export const statusPayloadSchema = z.enum(["online", "offline"]);

/** The code stored with a reading for each quality name (its index in lib/quality.ts). */
export const qualityCodes = { good: 0, uncertain: 1, bad: 2 } as const satisfies Record<Quality, number>;

export type GatewayTopic =
  | { kind: "json"; gatewayId: string; channel: "readings" | "status" | "commands" }
  | { kind: "sparkplug"; groupId: string; messageType: SparkplugMessageType; edgeNodeId: string; deviceId?: string }
  | { kind: "other" };

/** Sparkplug B 3.0 §4.2 (message types an edge node publishes, plus the commands it receives). */
export const sparkplugMessageTypes = [
  "NBIRTH",
  "NDEATH",
  "DBIRTH",
  "DDEATH",
  "NDATA",
  "DDATA",
  "NCMD",
  "DCMD",
] as const;
export type SparkplugMessageType = (typeof sparkplugMessageTypes)[number];

const idLevel = /^[A-Za-z0-9._-]{1,64}$/;

export function parseTopic(topic: string): GatewayTopic {
  const parts = topic.split("/");
  if (parts[0] === TOPIC_ROOT && parts.length === 3 && idLevel.test(parts[1])) {
    const channel = parts[2];
    if (channel === "readings" || channel === "status" || channel === "commands")
      return { kind: "json", gatewayId: parts[1], channel };
  }
  // Sparkplug B 3.0 §4.1.1: namespace/group_id/message_type/edge_node_id[/device_id]
  if (parts[0] === SPARKPLUG_NAMESPACE && (parts.length === 4 || parts.length === 5)) {
    const messageType = parts[2] as SparkplugMessageType;
    if (sparkplugMessageTypes.includes(messageType) && parts.slice(1).every((p) => idLevel.test(p))) {
      const deviceNeeded = messageType.startsWith("D");
      if (deviceNeeded === (parts.length === 5)) {
        return { kind: "sparkplug", groupId: parts[1], messageType, edgeNodeId: parts[3], deviceId: parts[4] };
      }
    }
  }
  return { kind: "other" };
}

export const jsonTopics = {
  readings: (gatewayId: string) => `${TOPIC_ROOT}/${gatewayId}/readings`,
  status: (gatewayId: string) => `${TOPIC_ROOT}/${gatewayId}/status`,
  commands: (gatewayId: string) => `${TOPIC_ROOT}/${gatewayId}/commands`,
};

export const sparkplugTopic = (groupId: string, type: SparkplugMessageType, edgeNodeId: string, deviceId?: string) =>
  [SPARKPLUG_NAMESPACE, groupId, type, edgeNodeId, ...(deviceId ? [deviceId] : [])].join("/");
