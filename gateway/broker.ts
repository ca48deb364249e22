import net from "node:net";
import { Aedes, type AuthenticateError, type Client, type PublishPacket } from "aedes";
import { MAX_CONNECT_BYTES, MAX_PACKET_BYTES, type RejectionReason } from "./contract";
import { LimitedConnection, type PacketViolation } from "./packet-limit";

// The embedded MQTT broker. Transport (a TCP server) is kept apart from the broker so tests
// can drive it over any duplex stream; who may connect, publish and subscribe is injected.
// No handler lets an exception escape into aedes: a thrown callback would leave a CONNECT
// unanswered or end the process.

/** Who a connected client is, decided once at CONNECT. */
export type ClientIdentity =
  | { kind: "internal" }
  | {
      kind: "gateway";
      gatewayId: string;
      siteId: string;
      protocol: "json" | "sparkplug";
      groupId: string | null;
      edgeNodeId: string | null;
    };

export interface ConnectAttempt {
  clientId: string;
  username: string | undefined;
  password: string | undefined;
  /** The client's remote address, for counting failed attempts per address. */
  address?: string;
}

/** What the broker refuses from a connected client; the caller counts it. */
export type BrokerRefusal = Extract<RejectionReason, "foreign_topic" | "too_large" | "invalid_message">;

export interface BrokerAuth {
  /**
   * Read before the credentials. False closes the connection without a CONNACK: MQTT 3.1.1 has
   * no return code for it, and then none is sent (§3.2.2.3, [MQTT-3.2.2-6]).
   */
  acceptsKeepalive(username: string | undefined, keepaliveS: number): boolean;
  authenticate(
    attempt: ConnectAttempt,
  ): Promise<ClientIdentity | "identifier_rejected" | "bad_credentials" | "not_authorized">;
  canPublish(identity: ClientIdentity, topic: string): boolean;
  /** Null when a retained message may be kept, else why it is refused. */
  refuseRetained(
    identity: ClientIdentity,
    topic: string,
    payloadBytes: number,
  ): Extract<BrokerRefusal, "too_large" | "invalid_message"> | null;
  canSubscribe(identity: ClientIdentity, topic: string): boolean;
}

/**
 * Called for every authorized publish before the broker acknowledges it. With QoS 1 aedes
 * sends PUBACK only after this callback, so holding it until the readings are committed
 * means an acknowledged reading is a stored reading.
 */
export type PublishGate = (identity: ClientIdentity, packet: PublishPacket) => Promise<unknown>;

export interface EmbeddedBrokerOptions {
  host: string;
  port: number;
  auth: BrokerAuth;
  onPublish?: PublishGate;
  /**
   * A publish or packet refused from a connected client; the connection is closed, as MQTT 3.1.1
   * has no negative PUBACK (§3.3.5). `topic` is null for a packet over the size limit.
   */
  onRefused?: (identity: ClientIdentity, reason: BrokerRefusal, topic: string | null) => void;
  /** A client finished CONNECT / went away (for gateway presence). */
  onClientChange?: (identity: ClientIdentity, change: "connected" | "disconnected") => void;
  log?: (line: string) => void;
}

export interface EmbeddedBroker {
  aedes: Aedes;
  port: number;
  connectedClients(): number;
  /** Publishes on behalf of the server (commands, Sparkplug rebirth requests, STATE). */
  publish(topic: string, payload: Buffer, opts?: { qos?: 0 | 1; retain?: boolean }): Promise<void>;
  /** Drops every connection of a gateway (after a revoke or password rotation). */
  disconnectGateway(gatewayId: string): number;
  close(): Promise<void>;
}

const identities = new WeakMap<Client, ClientIdentity>();
const remoteAddresses = new WeakMap<Client, string | undefined>();

function refusal(code: 2 | 3 | 4 | 5, message: string): AuthenticateError {
  // MQTT 3.1.1 §3.2.2.3: 2 = identifier rejected, 3 = server unavailable, 4 = bad user name or
  // password, 5 = not authorized
  return Object.assign(new Error(message), { returnCode: code }) as AuthenticateError;
}

/** A callback that runs at most once, whoever calls it. */
function once<A extends unknown[]>(fn: (...args: A) => void): (...args: A) => void {
  let called = false;
  return (...args) => {
    if (called) return;
    called = true;
    fn(...args);
  };
}

/**
 * Lines about connections that never authenticated, which anyone can cause: at most one per
 * interval, saying how many were left out.
 */
function throttled(log: (line: string) => void, intervalMs: number): (line: string) => void {
  let lastMs = -Infinity;
  let skipped = 0;
  return (line) => {
    const now = Date.now();
    if (now - lastMs < intervalMs) {
      skipped++;
      return;
    }
    lastMs = now;
    log(skipped ? `${line} (${skipped} more like it not logged)` : line);
    skipped = 0;
  };
}

const asError = (err: unknown) => (err instanceof Error ? err : new Error(String(err)));
/** Client ids and topics come from the wire; quoted and cut short in the log. */
const quote = (s: string | undefined) => JSON.stringify((s ?? "").slice(0, 100));

export async function startEmbeddedBroker(opts: EmbeddedBrokerOptions): Promise<EmbeddedBroker> {
  const log = opts.log ?? (() => {});
  const refusedConnectLog = throttled(log, 5000);
  const authErrorLog = throttled(log, 5000);

  function refused(identity: ClientIdentity, reason: BrokerRefusal, topic: string | null) {
    try {
      opts.onRefused?.(identity, reason, topic);
    } catch (err) {
      log(`[mqtt] counting a refusal (${reason}) failed: ${String(err)}`);
    }
  }

  function clientChanged(client: Client, change: "connected" | "disconnected") {
    const identity = identities.get(client);
    if (!identity) return;
    try {
      opts.onClientChange?.(identity, change);
    } catch (err) {
      log(`[mqtt] ${quote(client.id)} ${change}; recording it failed: ${String(err)}`);
    }
  }

  /** Why a client's publish is refused, or null. */
  function publishRefusal(identity: ClientIdentity, packet: PublishPacket): BrokerRefusal | null {
    // The broker's own $SYS topics are never writable by clients.
    if (packet.topic.startsWith("$SYS/") || !opts.auth.canPublish(identity, packet.topic)) return "foreign_topic";
    if (!packet.retain) return null;
    const bytes = typeof packet.payload === "string" ? Buffer.byteLength(packet.payload) : packet.payload.length;
    return opts.auth.refuseRetained(identity, packet.topic, bytes);
  }

  const aedes = await Aedes.createBroker({
    // Bounds that keep a misbehaving client from exhausting the process.
    maxTopicLevels: 12,
    drainTimeout: 10_000,
    connectTimeout: 15_000,
    preConnect(client, packet, callback) {
      const done = once(callback);
      try {
        const keepaliveS = packet.keepalive ?? 0;
        if (opts.auth.acceptsKeepalive(packet.username, keepaliveS)) return done(null, true);
        refusedConnectLog(`[mqtt] CONNECT ${quote(packet.clientId)} with keep alive ${keepaliveS} s refused; closed`);
        done(new Error("keep alive out of range"), false);
      } catch (err) {
        log(`[mqtt] CONNECT check failed: ${String(err)}`);
        done(asError(err), false);
      }
    },
    authenticate(client, username, password, callback) {
      const done = once(callback);
      const answer = (result: Awaited<ReturnType<BrokerAuth["authenticate"]>>) => {
        if (result === "identifier_rejected") {
          refusedConnectLog(`[mqtt] client id ${quote(client.id)} is not the user name ${quote(username)}; refused`);
          return done(refusal(2, "identifier rejected"), false);
        }
        if (result === "bad_credentials") return done(refusal(4, "bad user name or password"), false);
        if (result === "not_authorized") return done(refusal(5, "not authorized"), false);
        identities.set(client, result);
        done(null, true);
      };
      const unavailable = (err: unknown) => {
        authErrorLog(`[mqtt] authenticate failed: ${String(err)}`);
        done(refusal(3, "server unavailable"), false);
      };
      try {
        opts.auth
          .authenticate({
            clientId: client.id,
            username,
            password: password?.toString("utf8"),
            address: remoteAddresses.get(client),
          })
          .then(answer, unavailable)
          .catch(unavailable);
      } catch (err) {
        unavailable(err);
      }
    },
    authorizePublish(client, packet, callback) {
      const done = once(callback);
      try {
        const identity = client ? identities.get(client) : undefined;
        if (!identity) return done(new Error("not allowed to publish here"));
        const reason = publishRefusal(identity, packet);
        if (reason) {
          log(`[mqtt] ${quote(client?.id)}: ${reason} on ${quote(packet.topic)}; disconnecting`);
          refused(identity, reason, packet.topic);
          return done(new Error(`publish refused: ${reason}`));
        }
        if (!opts.onPublish) return done(null);
        opts
          .onPublish(identity, packet)
          .then(
            () => done(null),
            (err: unknown) => {
              log(`[mqtt] publish from ${quote(client?.id)} not stored: ${String(err)}`);
              done(asError(err));
            },
          )
          .catch((err: unknown) => log(`[mqtt] publish callback failed: ${String(err)}`));
      } catch (err) {
        log(`[mqtt] publish check failed: ${String(err)}`);
        done(asError(err));
      }
    },
    authorizeSubscribe(client, subscription, callback) {
      const done = once(callback);
      try {
        const identity = identities.get(client);
        // MQTT 3.1.1 §3.9.3: a refused subscription gets return code 0x80 in SUBACK; the
        // connection stays up (aedes grants 128 for a null subscription).
        if (!identity || !opts.auth.canSubscribe(identity, subscription.topic)) return done(null, null);
        done(null, subscription);
      } catch (err) {
        log(`[mqtt] subscribe check failed: ${String(err)}`);
        done(null, null);
      }
    },
  });

  aedes.on("client", (client) => clientChanged(client, "connected"));
  aedes.on("clientDisconnect", (client) => clientChanged(client, "disconnected"));
  // aedes emits "error" (undeclared in its typings) when it cannot publish a stored will;
  // unheard, it would end the process.
  (aedes as unknown as NodeJS.EventEmitter).on("error", (err: unknown) => log(`[mqtt] ${String(err)}`));

  const server = net.createServer((socket) => {
    // Called on a later chunk, once `client` below is set.
    const connection = new LimitedConnection(
      socket,
      { connectMaxBytes: MAX_CONNECT_BYTES, packetMaxBytes: MAX_PACKET_BYTES },
      (violation: PacketViolation) => {
        const identity = identities.get(client);
        const who = client.id ? quote(client.id) : `${socket.remoteAddress}:${socket.remotePort}`;
        (identity ? log : refusedConnectLog)(`[mqtt] ${who}: ${describeViolation(violation)}; closed`);
        if (identity && violation.kind === "too_large") refused(identity, "too_large", null);
      },
    );
    const client = aedes.handle(connection);
    // aedes sees the size-checking wrapper, not the socket: failed CONNECTs are counted per address.
    remoteAddresses.set(client, socket.remoteAddress);
  });
  server.on("error", (err) => log(`[mqtt] ${String(err)}`));
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(opts.port, opts.host, () => {
      server.off("error", reject);
      resolve();
    });
  });
  const address = server.address();
  const port = typeof address === "object" && address ? address.port : opts.port;

  return {
    aedes,
    port,
    connectedClients: () => aedes.connectedClients,
    publish(topic, payload, o) {
      return new Promise<void>((resolve, reject) => {
        aedes.publish(
          { cmd: "publish", topic, payload, qos: o?.qos ?? 0, retain: o?.retain ?? false, dup: false },
          (err) => (err ? reject(err) : resolve()),
        );
      });
    },
    disconnectGateway(gatewayId) {
      let n = 0;
      // aedes keeps connected clients by id; its typings do not declare the map.
      const clients = (aedes as unknown as { clients: Record<string, Client> }).clients;
      for (const client of Object.values(clients)) {
        const identity = identities.get(client);
        if (identity?.kind === "gateway" && identity.gatewayId === gatewayId) {
          client.close();
          n++;
        }
      }
      return n;
    },
    async close() {
      await new Promise<void>((resolve) => aedes.close(() => resolve()));
      await new Promise<void>((resolve) => server.close(() => resolve()));
    },
  };
}

function describeViolation(v: PacketViolation): string {
  if (v.kind === "not_connect") return `first packet is type ${v.packetType}, not CONNECT`;
  if (v.kind === "malformed_length") return "malformed remaining length";
  return `${v.first ? "CONNECT" : "packet"} of ${v.bytes} bytes is over the limit`;
}
