import type { IngestGateway, IngestPoint } from "@/db/queries/gateways";
import type { Clock } from "@/lib/clock";
import { isPlausible } from "@/lib/quantities";
import { toCanonical } from "@/lib/units";
import {
  fastReading,
  MAX_FUTURE_MS,
  MAX_PAYLOAD_BYTES,
  parseTopic,
  qualityCodes,
  readingSchema,
  readingsMessageSchema,
  statusPayloadSchema,
  type RejectionReason,
} from "./contract";
import type { GatewayRegistry } from "./registry";
import type { SparkplugHost } from "./sparkplug";
import type { RowIn } from "./row-columns";
import type { Batch, BatchWriter } from "./writer";

// From a published message to a batch for the writer: topic → gateway, payload → zod,
// point names → points through the gateway's point map, wire units → canonical units.
// Every rejected reading is counted by reason; good readings of the same message are kept.

export type Presence = "online" | "offline";

export interface IngestDeps {
  writer: BatchWriter;
  registry: GatewayRegistry;
  sparkplug: SparkplugHost;
  clock: Clock;
  rawRetentionMs: number;
  /** Presence changes (status topic, NBIRTH/NDEATH); the caller persists and broadcasts. */
  onPresence?: (gateway: IngestGateway, state: Presence, atMs: number) => void;
  /** Messages per second one gateway may send before it is cut off. */
  maxMessagesPerS?: number;
  log?: (line: string) => void;
}

export interface Ingest {
  /** Resolves once the message's readings and counters are committed (or it was rejected and counted). */
  handle(gatewayId: string, topic: string, payload: Buffer): Promise<unknown>;
  /** External broker mode: the topic alone says which gateway a message belongs to. */
  handleByTopic(topic: string, payload: Buffer): Promise<unknown>;
  /** The broker refused a publish (another gateway's topic); counted, the client is disconnected. */
  refused(gatewayId: string, reason: RejectionReason): void;
}

export class RateLimitedError extends Error {
  constructor(gatewayId: string) {
    super(`gateway ${gatewayId} exceeded its message rate`);
  }
}

const numericMeasures = new Set([
  "temperature",
  "pressure",
  "differential_pressure",
  "flow",
  "power",
  "percent",
  "frequency",
  "duration",
]);

/** A value checked against the point it maps to, in canonical units; or why not. */
export function toRow(
  point: IngestPoint,
  value: unknown,
  ts: number,
  quality: 0 | 1 | 2,
): RowIn | "wrong_type" | "out_of_range" {
  // One object literal per row (no spread of a shared base): this runs for every reading.
  if (numericMeasures.has(point.measure)) {
    if (typeof value !== "number" || !Number.isFinite(value)) return "wrong_type";
    const v = toCanonical(value, point.unit);
    if (!Number.isFinite(v)) return "wrong_type";
    if (!isPlausible(point.measure, v)) return "out_of_range";
    return { pointId: point.pointId, siteId: point.siteId, ts, quality, value: v, text: null, live: v };
  }
  if (point.measure === "boolean") {
    const b = typeof value === "boolean" ? value : value === 1 ? true : value === 0 ? false : undefined;
    if (b === undefined) return "wrong_type";
    return { pointId: point.pointId, siteId: point.siteId, ts, quality, value: b ? 1 : 0, text: null, live: b };
  }
  if (typeof value !== "string" || value.length === 0) return "wrong_type";
  if (point.measure === "state") {
    const s = value.trim().toLowerCase();
    if (point.states && !point.states.includes(s)) return "wrong_type";
    return { pointId: point.pointId, siteId: point.siteId, ts, quality, value: null, text: s, live: s };
  }
  return { pointId: point.pointId, siteId: point.siteId, ts, quality, value: null, text: value, live: value };
}

// No async functions on this path: a message costs one promise (the writer's), not a chain of
// them, each also running the async hooks Next.js enables.
export function createIngest(deps: IngestDeps): Ingest {
  const log = deps.log ?? (() => {});
  const maxPerS = deps.maxMessagesPerS ?? 500;
  /** Messages per gateway in the current one-second window (a counter: this runs per message). */
  const windows = new Map<string, { startMs: number; count: number }>();
  function withinRate(gatewayId: string): boolean {
    const nowMs = Date.now();
    let w = windows.get(gatewayId);
    if (!w) windows.set(gatewayId, (w = { startMs: nowMs, count: 0 }));
    if (nowMs - w.startMs >= 1000) {
      w.startMs = nowMs;
      w.count = 0;
    }
    return ++w.count <= maxPerS;
  }

  function counterOnly(gatewayId: string, reason: RejectionReason, now: number): Batch {
    return { gatewayId, rows: [], messages: 1, rejections: { [reason]: 1 }, receivedAtMs: now };
  }

  function bump(batch: Batch, r: RejectionReason) {
    const rej = (batch.rejections ??= {});
    rej[r] = (rej[r] ?? 0) + 1;
  }

  /** Shared by both protocols: name → point → checked row, one reading at a time (no intermediate arrays). */
  function mapValue(
    gw: IngestGateway,
    name: string,
    value: unknown,
    tsMs: number,
    quality: 0 | 1 | 2,
    now: number,
    batch: Batch,
  ) {
    const point = gw.map.get(name);
    if (!point) {
      bump(batch, "unmapped_point");
      batch.unmapped ??= new Map();
      batch.unmapped.set(name, (batch.unmapped.get(name) ?? 0) + 1);
      return;
    }
    if (!Number.isFinite(tsMs)) return bump(batch, "invalid_reading");
    const ts = Math.round(tsMs);
    if (ts > now + MAX_FUTURE_MS) return bump(batch, "future_timestamp");
    if (ts < now - deps.rawRetentionMs) return bump(batch, "too_old");
    const row = toRow(point, value, ts, quality);
    if (typeof row === "string") bump(batch, row);
    else batch.rows.push(row);
  }

  const submit = (batch: Batch): Promise<unknown> => deps.writer.submit(batch);

  function handleJson(
    gw: IngestGateway,
    channel: "readings" | "status" | "commands",
    payload: Buffer,
    now: number,
  ): Promise<unknown> {
    if (channel === "status") {
      const state = statusPayloadSchema.safeParse(payload.toString("utf8").trim());
      if (!state.success) return submit(counterOnly(gw.gatewayId, "invalid_message", now));
      deps.onPresence?.(gw, state.data, now);
      return submit({ gatewayId: gw.gatewayId, rows: [], messages: 1, receivedAtMs: now });
    }
    if (channel !== "readings") return submit(counterOnly(gw.gatewayId, "bad_topic", now));
    let body: unknown;
    try {
      body = JSON.parse(payload.toString("utf8"));
    } catch {
      return submit(counterOnly(gw.gatewayId, "malformed_json", now));
    }
    const envelope = readingsMessageSchema.safeParse(body);
    if (!envelope.success) return submit(counterOnly(gw.gatewayId, "invalid_message", now));
    const sentAt = Date.parse(envelope.data.sentAt);
    const batch: Batch = { gatewayId: gw.gatewayId, rows: [], messages: 1, rejections: {}, receivedAtMs: now };
    const list = envelope.data.readings;
    const parsedTs = { tsMs: NaN };
    for (let i = 0; i < list.length; i++) {
      // The common valid reading skips safeParse; anything else gets zod's verdict.
      let r = fastReading(list[i], parsedTs);
      let tsMs = parsedTs.tsMs;
      if (r === undefined) {
        const parsed = readingSchema.safeParse(list[i]);
        if (!parsed.success) {
          bump(batch, "invalid_reading");
          continue;
        }
        r = parsed.data;
        tsMs = r.ts !== undefined ? Date.parse(r.ts) : NaN;
      }
      mapValue(
        gw,
        r.point,
        r.value,
        r.ts !== undefined ? tsMs : sentAt,
        r.quality === undefined ? 0 : qualityCodes[r.quality],
        now,
        batch,
      );
    }
    return submit(batch);
  }

  function handleFor(gw: IngestGateway, topic: string, payload: Buffer): Promise<unknown> {
    const now = deps.clock.now();
    if (!withinRate(gw.gatewayId)) {
      return submit(counterOnly(gw.gatewayId, "rate_limited", now)).then(() => {
        throw new RateLimitedError(gw.gatewayId);
      });
    }
    if (payload.length > MAX_PAYLOAD_BYTES) return submit(counterOnly(gw.gatewayId, "too_large", now));
    const t = parseTopic(topic);
    if (t.kind === "json" && gw.protocol === "json" && t.gatewayId === gw.gatewayId)
      return handleJson(gw, t.channel, payload, now);
    if (
      t.kind === "sparkplug" &&
      gw.protocol === "sparkplug" &&
      t.groupId === gw.groupId &&
      t.edgeNodeId === gw.edgeNodeId
    ) {
      const out = deps.sparkplug.handle(gw.gatewayId, t, payload, now);
      if (out.presence) deps.onPresence?.(gw, out.presence, now);
      const batch: Batch = {
        gatewayId: gw.gatewayId,
        rows: [],
        messages: 1,
        rejections: { ...out.rejections },
        receivedAtMs: now,
      };
      for (const v of out.values) mapValue(gw, v.name, v.value, Number.isFinite(v.tsMs) ? v.tsMs : now, 0, now, batch);
      return submit(batch);
    }
    return submit(counterOnly(gw.gatewayId, "bad_topic", now));
  }

  /** Exceptions become rejections, as from an async function (the broker holds the PUBACK on it). */
  function settled(run: () => Promise<unknown>): Promise<unknown> {
    try {
      return run();
    } catch (err) {
      return Promise.reject(err);
    }
  }

  return {
    handle(gatewayId, topic, payload) {
      return settled(() => {
        const gw = deps.registry.get(gatewayId);
        if (!gw || gw.revoked) throw new Error(`gateway ${gatewayId} is unknown or revoked`);
        return handleFor(gw, topic, payload);
      });
    },
    handleByTopic(topic, payload) {
      return settled(() => {
        const t = parseTopic(topic);
        const gw =
          t.kind === "json"
            ? deps.registry.get(t.gatewayId)
            : t.kind === "sparkplug"
              ? deps.registry.bySparkplug(t.groupId, t.edgeNodeId)
              : null;
        if (!gw || gw.revoked) {
          // Nobody to count it against; acknowledged so the broker does not resend it forever.
          log(`[ingest] message on ${topic} belongs to no active gateway; dropped`);
          return Promise.resolve();
        }
        return handleFor(gw, topic, payload);
      });
    },
    refused(gatewayId, reason) {
      deps.writer
        .submit(counterOnly(gatewayId, reason, deps.clock.now()))
        .catch((err) => log(`[ingest] could not count a refusal: ${String(err)}`));
    },
  };
}
