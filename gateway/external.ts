import mqtt, { type MqttClient } from "mqtt";
import { SPARKPLUG_NAMESPACE, TOPIC_ROOT } from "./contract";
import type { Ingest } from "./ingest";
import { encodeStatePayload, stateTopic } from "./sparkplug";

// External broker mode (MQTT_URL set): Liftline is one more client of a broker such as
// Mosquitto, over MQTT 5. A persistent session (clean start = 0 with a session expiry) at QoS 1 keeps
// messages queued at the broker while Liftline is down; each PUBACK is sent only after the
// message is committed, through mqtt.js `customHandleAcks`. Who may publish where is the
// broker's ACL job here (gateway/PROTOCOL.md); Liftline still checks each topic against
// the gateway it names and drops topics of unknown or revoked gateways.

export interface ExternalBrokerOptions {
  url: string;
  clientId: string;
  username?: string;
  password?: string;
  ingest: Ingest;
  log?: (line: string) => void;
}

export interface ExternalBroker {
  client: MqttClient;
  connected(): boolean;
  publish(topic: string, payload: Buffer, opts?: { qos?: 0 | 1; retain?: boolean }): Promise<void>;
  close(): Promise<void>;
}

/** How long the broker keeps Liftline's session (and queues its messages) while it is away. */
export const SESSION_EXPIRY_S = 7 * 86_400;

export const externalSubscriptions = [
  `${TOPIC_ROOT}/+/readings`,
  `${TOPIC_ROOT}/+/status`,
  `${SPARKPLUG_NAMESPACE}/+/NBIRTH/+`,
  `${SPARKPLUG_NAMESPACE}/+/NDEATH/+`,
  `${SPARKPLUG_NAMESPACE}/+/NDATA/+`,
  `${SPARKPLUG_NAMESPACE}/+/DBIRTH/+/+`,
  `${SPARKPLUG_NAMESPACE}/+/DDEATH/+/+`,
  `${SPARKPLUG_NAMESPACE}/+/DDATA/+/+`,
];

export async function connectExternalBroker(opts: ExternalBrokerOptions): Promise<ExternalBroker> {
  const log = opts.log ?? (() => {});
  const client = mqtt.connect(opts.url, {
    clientId: opts.clientId,
    // MQTT 5: mqtt.js honours customHandleAcks only on a v5 connection. A persistent session
    // needs clean start = 0 and a session expiry (§3.1.2.11.2; 0 would end it at disconnect).
    protocolVersion: 5,
    clean: false,
    properties: { sessionExpiryInterval: SESSION_EXPIRY_S },
    username: opts.username,
    password: opts.password,
    reconnectPeriod: 1000,
    // Sparkplug B 3.0 §5.2: the host's STATE death certificate, retained.
    will: { topic: stateTopic, payload: encodeStatePayload(false, Date.now()), qos: 1, retain: true },
    // QoS 1 messages: acknowledged after commit. mqtt.js handles one packet at a time here,
    // which keeps PUBACKs in order (MQTT 3.1.1 §4.6) and costs one flush per message.
    customHandleAcks(topic, message, _packet, done) {
      opts.ingest.handleByTopic(topic, message).then(
        () => done(0),
        (err: unknown) => {
          log(`[mqtt-external] ${topic} not stored (${String(err)}); reconnecting so the broker resends it`);
          done(err instanceof Error ? err : new Error(String(err)));
          client.stream?.destroy();
        },
      );
    },
  });
  client.on("message", (topic, message, packet) => {
    // QoS 0 (Sparkplug data is QoS 0, §7.1): no acknowledgement to hold.
    if (packet.qos !== 0) return;
    opts.ingest.handleByTopic(topic, message).catch((err) => log(`[mqtt-external] ${topic}: ${String(err)}`));
  });
  client.on("error", (err) => log(`[mqtt-external] ${err.message}`));
  client.on("connect", (connack) => {
    log(`[mqtt-external] connected to ${opts.url} (session ${connack.sessionPresent ? "resumed" : "new"})`);
    client.subscribe(
      externalSubscriptions.map((t) => t),
      { qos: 1 },
      (err) => err && log(`[mqtt-external] subscribe failed: ${err.message}`),
    );
    client.publish(stateTopic, encodeStatePayload(true, Date.now()), { qos: 1, retain: true });
  });

  await new Promise<void>((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`could not reach the MQTT broker at ${opts.url}`)), 15_000);
    client.once("connect", () => {
      clearTimeout(timer);
      resolve();
    });
  });

  return {
    client,
    connected: () => client.connected,
    publish: (topic, payload, o) =>
      new Promise<void>((resolve, reject) =>
        client.publish(topic, payload, { qos: o?.qos ?? 0, retain: o?.retain ?? false }, (err) =>
          err ? reject(err) : resolve(),
        ),
      ),
    close: () =>
      new Promise<void>((resolve) => {
        client.publish(stateTopic, encodeStatePayload(false, Date.now()), { qos: 1, retain: true }, () =>
          client.end(false, {}, () => resolve()),
        );
      }),
  };
}
