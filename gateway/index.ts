import { randomBytes } from "node:crypto";
import type { Db } from "@/db/client";
import { markAllGatewaysOffline, setGatewayState, type IngestGateway } from "@/db/queries/gateways";
import type { Config } from "@/lib/server/config";
import { createGatewayAuth } from "./auth";
import { jsonTopics } from "./contract";
import { startEmbeddedBroker, type EmbeddedBroker } from "./broker";
import { createConnectLimiter } from "./connect-limiter";
import { connectExternalBroker, type ExternalBroker } from "./external";
import { createIngest, type Ingest, type Presence } from "./ingest";
import { createGatewayRegistry } from "./registry";
import { createSparkplugHost, encodeStatePayload, stateTopic } from "./sparkplug";
import { systemClock, type Clock } from "@/lib/clock";
import type { CommittedRows } from "./row-columns";
import { createBatchWriter, type BatchWriter, type StorageReporter } from "./writer";

// The gateway side of the server, assembled from its parts: broker (embedded, or a client of
// MQTT_URL), ingest, and the batched writer with retention pruning. Whoever starts it says who
// hears of committed rows, presence and mapping changes.

export type GatewaySettings = Pick<
  Config,
  | "HOST"
  | "MQTT_PORT"
  | "MQTT_URL"
  | "MQTT_CLIENT_ID"
  | "MQTT_USERNAME"
  | "MQTT_PASSWORD"
  | "INGEST_FLUSH_MS"
  | "INGEST_MAX_BATCH_ROWS"
  | "GATEWAY_MAX_MSGS_PER_S"
  | "GATEWAY_CONNECT_WINDOW_S"
  | "GATEWAY_CONNECT_MAX_PER_GATEWAY"
  | "GATEWAY_CONNECT_MAX_PER_ADDRESS"
  | "RAW_RETENTION_DAYS"
  | "ROLLUP_RETENTION_DAYS"
>;

export interface GatewaySideOptions {
  db: Db;
  config: GatewaySettings;
  /** Called in order with the new rows of every commit. */
  onCommitted: ReadonlyArray<(rows: CommittedRows) => void>;
  /** A gateway of the site connected or went away. */
  onPresence?: (siteId: string) => void;
  /** A gateway was provisioned or revoked, or its point map replaced. */
  onMappingChanged?: () => void;
  /** Hears of failed and committed writes (a full disk). */
  storage?: StorageReporter;
  clock?: Clock;
  log: (line: string) => void;
}

/** What changed about a gateway's record, as the running gateway side needs to hear of it. */
export type GatewayChange = "provisioned" | "point_map" | "credentials" | "revoked";

export interface GatewaySide {
  mode: "embedded" | "external";
  mqttPort: number | null;
  ingest: Ingest;
  writer: BatchWriter;
  status(): { up: boolean; clients: number };
  /** Publishes a JSON message on a gateway's command topic, QoS 1 (the simulator's drills). */
  sendGatewayCommand(gatewayId: string, payload: unknown): void;
  /** Publishes a prepared message (a Sparkplug DCMD to a simulated training node), QoS 1. */
  publishCommand(topic: string, payload: Buffer): void;
  /** A gateway's record changed: drop its cached map, and cut its connection when it may no longer use it. */
  gatewayChanged(gatewayId: string, change: GatewayChange): void;
  close(): Promise<void>;
}

const DAY_MS = 86_400_000;

export async function startGatewaySide(opts: GatewaySideOptions): Promise<GatewaySide> {
  const { db, config, log } = opts;
  const clock = opts.clock ?? systemClock;
  const rawRetentionMs = config.RAW_RETENTION_DAYS * DAY_MS;
  const external = config.MQTT_URL !== undefined;
  const listeners = opts.onCommitted;

  const writer = createBatchWriter({
    db,
    clock,
    // An external session waits for each acknowledgement, so its flushes must not wait.
    flushMs: external ? 0 : config.INGEST_FLUSH_MS,
    maxRows: config.INGEST_MAX_BATCH_ROWS,
    onCommitted: (rows) => {
      for (const listener of listeners) listener(rows);
    },
    retention: { rawMs: rawRetentionMs, rollupMs: config.ROLLUP_RETENTION_DAYS * DAY_MS },
    storage: opts.storage,
    log,
  });
  const registry = createGatewayRegistry({ db, clock });
  let sendCommand: (topic: string, payload: Buffer) => void = () => {};
  const sparkplug = createSparkplugHost({ publishCommand: (t, p) => sendCommand(t, p), log });

  function presence(gw: Pick<IngestGateway, "gatewayId" | "siteId">, state: Presence, atMs: number) {
    try {
      setGatewayState(db, gw.gatewayId, state, new Date(atMs));
    } catch (err) {
      // Runs inside the broker's CONNECT and disconnect handling: a throw would leave the
      // gateway without a CONNACK. Presence is a convenience; the connection is not.
      log(`[mqtt] could not record ${gw.gatewayId} as ${state}: ${String(err)}`);
      opts.storage?.failed(err, "gateway presence");
    }
    opts.onPresence?.(gw.siteId);
  }

  const ingest = createIngest({
    writer,
    registry,
    sparkplug,
    clock,
    rawRetentionMs,
    onPresence: presence,
    maxMessagesPerS: config.GATEWAY_MAX_MSGS_PER_S,
    log,
  });

  let embedded: EmbeddedBroker | undefined;
  let ext: ExternalBroker | undefined;
  if (external) {
    ext = await connectExternalBroker({
      url: config.MQTT_URL!,
      clientId: config.MQTT_CLIENT_ID,
      username: config.MQTT_USERNAME,
      password: config.MQTT_PASSWORD,
      ingest,
      log,
    });
    sendCommand = (t, p) => void ext!.publish(t, p).catch(() => {});
  } else {
    // Nobody is connected to a broker that has not started yet.
    markAllGatewaysOffline(db, new Date(clock.now()));
    const connections = new Map<string, number>();
    const internal = { username: "liftline-internal", password: randomBytes(24).toString("base64url") };
    embedded = await startEmbeddedBroker({
      host: config.HOST,
      port: config.MQTT_PORT,
      auth: createGatewayAuth({
        db,
        internal,
        limiter: createConnectLimiter({
          windowS: config.GATEWAY_CONNECT_WINDOW_S,
          maxPerGateway: config.GATEWAY_CONNECT_MAX_PER_GATEWAY,
          maxPerAddress: config.GATEWAY_CONNECT_MAX_PER_ADDRESS,
        }),
      }),
      onPublish: (identity, packet) =>
        identity.kind !== "gateway"
          ? Promise.resolve()
          : ingest.handle(
              identity.gatewayId,
              packet.topic,
              Buffer.isBuffer(packet.payload) ? packet.payload : Buffer.from(packet.payload),
            ),
      onRefused: (identity, reason) => {
        if (identity.kind === "gateway") ingest.refused(identity.gatewayId, reason);
      },
      onClientChange: (identity, change) => {
        if (identity.kind !== "gateway") return;
        // A gateway has one connection (its client id is its gateway id; a new one replaces the
        // old, MQTT 3.1.1 §3.1.4), counted anyway so presence follows the last one to go. Its
        // status topic or NBIRTH/NDEATH refine this.
        const n = (connections.get(identity.gatewayId) ?? 0) + (change === "connected" ? 1 : -1);
        if (n > 0) connections.set(identity.gatewayId, n);
        else connections.delete(identity.gatewayId);
        if (change === "connected" && n === 1) presence(identity, "online", clock.now());
        if (change === "disconnected" && n <= 0) {
          // Before the presence write, which may fail (the broker logs it).
          if (identity.protocol === "sparkplug") sparkplug.forget(identity.gatewayId);
          presence(identity, "offline", clock.now());
        }
      },
      log,
    });
    sendCommand = (t, p) => void embedded!.publish(t, p).catch(() => {});
    // Sparkplug B 3.0 §5.1: the primary host announces itself with a retained STATE message.
    await embedded.publish(stateTopic, encodeStatePayload(true, clock.now()), { qos: 1, retain: true });
  }

  return {
    mode: external ? "external" : "embedded",
    mqttPort: embedded?.port ?? null,
    ingest,
    writer,
    status: () =>
      embedded ? { up: true, clients: embedded.connectedClients() } : { up: ext?.connected() ?? false, clients: 0 },
    sendGatewayCommand: (gatewayId, payload) =>
      sendCommand(jsonTopics.commands(gatewayId), Buffer.from(JSON.stringify(payload))),
    publishCommand: (topic, payload) => sendCommand(topic, payload),
    gatewayChanged(gatewayId, change) {
      registry.invalidate(gatewayId);
      if (change !== "credentials") opts.onMappingChanged?.();
      if (change !== "point_map" && change !== "provisioned") {
        const n = embedded?.disconnectGateway(gatewayId) ?? 0;
        if (n) log(`[mqtt] ${gatewayId}: ${change}; closed ${n} connection(s)`);
      }
    },
    async close() {
      // Stop taking messages first, then commit what was accepted.
      await embedded?.close();
      await ext?.close();
      await writer.close();
    },
  };
}
