import sparkplugPayload from "sparkplug-payload";
import type { RejectionReason, SparkplugMessageType } from "./contract";
import { sparkplugTopic, SPARKPLUG_NAMESPACE } from "./contract";

// The Sparkplug B 3.0 host side for edge nodes: birth certificates declare metric names and
// aliases, DATA messages carry values by alias, DEATH and bdSeq mark a node offline, and a
// sequence gap is answered with a rebirth request. Payloads are decoded by sparkplug-payload.

const codec = sparkplugPayload.get(SPARKPLUG_NAMESPACE)!;
type Payload = ReturnType<typeof codec.decodePayload>;
type Metric = NonNullable<Payload["metrics"]>[number];

/** Liftline's Sparkplug host application id (Sparkplug B 3.0 §5.1: STATE/{host_id}). */
export const SPARKPLUG_HOST_ID = "liftline";
export const stateTopic = `${SPARKPLUG_NAMESPACE}/STATE/${SPARKPLUG_HOST_ID}`;
const REBIRTH_METRIC = "Node Control/Rebirth";
const REBIRTH_MIN_INTERVAL_MS = 5_000;

export interface NamedValue {
  /** Node metrics by name; device metrics as `{deviceId}/{name}`. */
  name: string;
  value: unknown;
  tsMs: number;
}

export interface SparkplugOutcome {
  values: NamedValue[];
  rejections: Partial<Record<RejectionReason, number>>;
  presence?: "online" | "offline";
}

interface NodeSession {
  bdSeq: number | null;
  seq: number | null;
  /** alias → full name (aliases are unique across a node and its devices, §6.4.3) */
  aliases: Map<string, string>;
  lastRebirthAt: number;
}

export interface SparkplugHost {
  handle(
    gatewayId: string,
    t: { groupId: string; messageType: SparkplugMessageType; edgeNodeId: string; deviceId?: string },
    payload: Buffer,
    nowMs: number,
  ): SparkplugOutcome;
  forget(gatewayId: string): void;
}

function toNumber(v: unknown): number | undefined {
  if (typeof v === "number") return v;
  if (typeof v === "bigint") return Number(v);
  if (v && typeof v === "object" && "toNumber" in v && typeof (v as { toNumber: unknown }).toNumber === "function")
    return (v as { toNumber(): number }).toNumber();
  return undefined;
}

function metricValue(m: Metric): unknown {
  const v = (m as { value?: unknown }).value;
  if (typeof v === "boolean" || typeof v === "string") return v;
  return toNumber(v) ?? v;
}

export function encodeRebirthRequest(nowMs: number): Buffer {
  // Sparkplug B 3.0 §6.4.16: NCMD with the Boolean metric "Node Control/Rebirth" = true
  return Buffer.from(
    codec.encodePayload({ timestamp: nowMs, metrics: [{ name: REBIRTH_METRIC, type: "Boolean", value: true }] }),
  );
}

export function encodeStatePayload(online: boolean, nowMs: number): Buffer {
  // Sparkplug B 3.0 §6.4.19: STATE is JSON, not protobuf
  return Buffer.from(JSON.stringify({ online, timestamp: nowMs }));
}

export function createSparkplugHost(deps: {
  publishCommand: (topic: string, payload: Buffer) => void;
  log?: (line: string) => void;
}): SparkplugHost {
  const sessions = new Map<string, NodeSession>();
  const log = deps.log ?? (() => {});

  function requestRebirth(
    gatewayId: string,
    session: NodeSession,
    groupId: string,
    edgeNodeId: string,
    nowMs: number,
    why: string,
  ) {
    if (nowMs - session.lastRebirthAt < REBIRTH_MIN_INTERVAL_MS) return;
    session.lastRebirthAt = nowMs;
    log(`[sparkplug] ${gatewayId} (${groupId}/${edgeNodeId}): ${why}; requesting rebirth`);
    deps.publishCommand(sparkplugTopic(groupId, "NCMD", edgeNodeId), encodeRebirthRequest(nowMs));
  }

  function collect(
    payload: Payload,
    session: NodeSession,
    deviceId: string | undefined,
    declare: boolean,
    out: SparkplugOutcome,
  ) {
    const payloadTs = toNumber(payload.timestamp);
    for (const m of payload.metrics ?? []) {
      const alias = toNumber(m.alias);
      let name = m.name ?? undefined;
      if (name !== undefined && deviceId) name = `${deviceId}/${name}`;
      if (declare && name !== undefined && alias !== undefined) session.aliases.set(String(alias), name);
      if (name === undefined && alias !== undefined) name = session.aliases.get(String(alias));
      if (name === undefined) {
        out.rejections.unknown_alias = (out.rejections.unknown_alias ?? 0) + 1;
        continue;
      }
      // Node control metrics and bdSeq describe the session, not the plant.
      if (!deviceId && (name === "bdSeq" || name.startsWith("Node Control/") || name.startsWith("Properties/")))
        continue;
      if (m.isNull) continue;
      out.values.push({ name, value: metricValue(m), tsMs: toNumber(m.timestamp) ?? payloadTs ?? NaN });
    }
  }

  return {
    handle(gatewayId, t, payload, nowMs) {
      const out: SparkplugOutcome = { values: [], rejections: {} };
      let decoded: Payload;
      try {
        decoded = codec.decodePayload(new Uint8Array(payload));
      } catch {
        out.rejections.sparkplug_decode = 1;
        return out;
      }
      let session = sessions.get(gatewayId);
      const seq = toNumber(decoded.seq);

      switch (t.messageType) {
        case "NBIRTH": {
          // §6.4.6: NBIRTH starts a new session; seq restarts at 0 and bdSeq identifies it.
          const bd = decoded.metrics?.find((m) => m.name === "bdSeq");
          session = {
            bdSeq: bd ? (toNumber(metricValue(bd)) ?? null) : null,
            seq: seq ?? 0,
            aliases: new Map(),
            lastRebirthAt: session?.lastRebirthAt ?? 0,
          };
          sessions.set(gatewayId, session);
          collect(decoded, session, undefined, true, out);
          out.presence = "online";
          return out;
        }
        case "NDEATH": {
          // §6.4.7: an NDEATH counts only when its bdSeq matches the current session's.
          const bd = decoded.metrics?.find((m) => m.name === "bdSeq");
          const bdSeq = bd ? toNumber(metricValue(bd)) : undefined;
          if (!session || session.bdSeq === null || bdSeq === undefined || bdSeq === session.bdSeq) {
            sessions.delete(gatewayId);
            out.presence = "offline";
          }
          return out;
        }
        case "DBIRTH":
        case "NDATA":
        case "DDATA":
        case "DDEATH": {
          if (!session) {
            out.rejections.sparkplug_no_birth = 1;
            requestRebirth(
              gatewayId,
              { bdSeq: null, seq: null, aliases: new Map(), lastRebirthAt: 0 },
              t.groupId,
              t.edgeNodeId,
              nowMs,
              `${t.messageType} before NBIRTH`,
            );
            sessions.set(gatewayId, { bdSeq: null, seq: null, aliases: new Map(), lastRebirthAt: nowMs });
            return out;
          }
          if (session.seq === null) {
            // Still waiting for the rebirth we asked for.
            out.rejections.sparkplug_no_birth = 1;
            requestRebirth(gatewayId, session, t.groupId, t.edgeNodeId, nowMs, `${t.messageType} before NBIRTH`);
            return out;
          }
          // §6.4.4/§6.4.5: seq runs 0..255 across every message of the session.
          const expected = (session.seq + 1) % 256;
          if (seq !== undefined && seq !== expected) {
            requestRebirth(
              gatewayId,
              session,
              t.groupId,
              t.edgeNodeId,
              nowMs,
              `seq gap (expected ${expected}, got ${seq})`,
            );
          }
          if (seq !== undefined) session.seq = seq;
          if (t.messageType === "DDEATH") return out;
          collect(decoded, session, t.deviceId, t.messageType === "DBIRTH", out);
          return out;
        }
        default:
          return out;
      }
    },
    forget(gatewayId) {
      sessions.delete(gatewayId);
    },
  };
}
