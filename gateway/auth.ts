import type { Db } from "@/db/client";
import { verifyGatewayCredentials } from "@/db/queries/gateways";
import type { BrokerAuth, ClientIdentity } from "./broker";
import type { ConnectLimiter } from "./connect-limiter";
import {
  jsonTopics,
  MAX_KEEPALIVE_S,
  MAX_RETAINED_BYTES,
  parseTopic,
  SPARKPLUG_NAMESPACE,
  TOPIC_ROOT,
} from "./contract";
import { stateTopic } from "./sparkplug";

// Who may connect to the embedded broker, and where each client may publish and subscribe.
// A gateway connects with its gateway id as client id, publishes only under its own topics,
// retains only its status, and subscribes only to its own commands.

export interface InternalCredential {
  username: string;
  password: string;
}

export function createGatewayAuth(deps: {
  db: Db;
  internal: InternalCredential;
  limiter?: ConnectLimiter;
}): BrokerAuth {
  return {
    acceptsKeepalive(username, keepaliveS) {
      if (username === deps.internal.username) return true;
      // MQTT 3.1.1 §3.1.2.10: 0 turns keep alive off, and a dead gateway's connection would stay open.
      return keepaliveS >= 1 && keepaliveS <= MAX_KEEPALIVE_S;
    },

    async authenticate({ clientId, username, password, address }) {
      if (username === deps.internal.username) {
        return password === deps.internal.password ? { kind: "internal" } : "bad_credentials";
      }
      if (username === undefined) return "bad_credentials";
      // The client id names the session (MQTT 3.1.1 §3.1.3.1); bound to the gateway id, no
      // connection can take over another gateway's session (§3.1.4). Checked before the
      // password, so such a CONNECT costs no hash.
      if (clientId !== username) return "identifier_rejected";
      const gate = deps.limiter?.gate(username, address);
      const result = await verifyGatewayCredentials(deps.db, username, password, gate);
      // MQTT 3.1.1 §3.2.2.3: 4 = bad user name or password, 5 = not authorized (revoked, or too
      // many failed attempts).
      if (result === "bad_credentials") return "bad_credentials";
      if (result === "revoked" || result === "limited") return "not_authorized";
      return { kind: "gateway", ...result };
    },

    canPublish(identity, topic) {
      if (identity.kind === "internal") return true;
      return ownsPublishTopic(identity, topic);
    },

    refuseRetained(identity, topic, payloadBytes) {
      if (identity.kind === "internal") return null;
      if (payloadBytes > MAX_RETAINED_BYTES) return "too_large";
      // Only a JSON gateway's status is retained; a Sparkplug edge node retains nothing (Sparkplug
      // B 3.0 §6: births, data and deaths are published with retain = false).
      if (identity.protocol === "json" && topic === jsonTopics.status(identity.gatewayId)) return null;
      return "invalid_message";
    },

    canSubscribe(identity, topic) {
      if (identity.kind === "internal") return true;
      if (identity.protocol === "json") return topic === `${TOPIC_ROOT}/${identity.gatewayId}/commands`;
      const node = `${SPARKPLUG_NAMESPACE}/${identity.groupId}`;
      // Sparkplug B 3.0 §6.4.16/§6.4.17 commands to this node and its devices, and §5.1 host STATE.
      const dcmd = `${node}/DCMD/${identity.edgeNodeId}/`;
      return (
        topic === `${node}/NCMD/${identity.edgeNodeId}` ||
        topic === `${node}/NCMD/${identity.edgeNodeId}/#` ||
        (topic.startsWith(dcmd) && /^(#|\+|[A-Za-z0-9._-]{1,64})$/.test(topic.slice(dcmd.length))) ||
        topic === stateTopic ||
        topic === `${SPARKPLUG_NAMESPACE}/STATE/+`
      );
    },
  };
}

/** A gateway's own namespace: `liftline/{id}/...` (JSON) or its Sparkplug node's topics. */
export function ownsPublishTopic(identity: Extract<ClientIdentity, { kind: "gateway" }>, topic: string): boolean {
  if (identity.protocol === "json") {
    const parts = topic.split("/");
    // Anything under its own id is its own; unknown channels are counted as bad_topic later.
    return parts[0] === TOPIC_ROOT && parts[1] === identity.gatewayId && parts.length >= 3;
  }
  const t = parseTopic(topic);
  return (
    t.kind === "sparkplug" &&
    t.groupId === identity.groupId &&
    t.edgeNodeId === identity.edgeNodeId &&
    // an edge node sends births, deaths and data, never commands (§6.4.16)
    t.messageType !== "NCMD" &&
    t.messageType !== "DCMD"
  );
}
