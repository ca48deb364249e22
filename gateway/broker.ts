import net from "node:net";
import { Aedes, type AuthenticateError, type Client, type PublishPacket } from "aedes";

// The embedded MQTT broker. Transport (a TCP server) is kept apart from the broker so tests
// can drive it over any duplex stream; who may connect, publish and subscribe is injected.

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

export interface BrokerAuth {
  authenticate(
    username: string | undefined,
    password: string | undefined,
    meta?: { address?: string },
  ): Promise<ClientIdentity | "bad_credentials" | "not_authorized">;
  canPublish(identity: ClientIdentity, topic: string): boolean;
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
  /** A publish canPublish refused (the client is then disconnected, MQTT 3.1.1 §3.3.5). */
  onRefusedPublish?: (identity: ClientIdentity, topic: string) => void;
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

function authError(code: 4 | 5, message: string): AuthenticateError {
  // MQTT 3.1.1 §3.2.2.3: 4 = bad user name or password, 5 = not authorized
  return Object.assign(new Error(message), { returnCode: code }) as AuthenticateError;
}

export async function startEmbeddedBroker(opts: EmbeddedBrokerOptions): Promise<EmbeddedBroker> {
  const log = opts.log ?? (() => {});
  const aedes = await Aedes.createBroker({
    // Bounds that keep a misbehaving client from exhausting the process.
    maxTopicLevels: 12,
    drainTimeout: 10_000,
    connectTimeout: 15_000,
    authenticate(client, username, password, done) {
      opts.auth
        .authenticate(username, password?.toString("utf8"), {
          address: (client.conn as Partial<net.Socket> | undefined)?.remoteAddress,
        })
        .then((result) => {
          if (result === "bad_credentials") return done(authError(4, "bad user name or password"), false);
          if (result === "not_authorized") return done(authError(5, "not authorized"), false);
          identities.set(client, result);
          done(null, true);
        })
        .catch((err) => {
          log(`[mqtt] authenticate failed: ${String(err)}`);
          done(authError(5, "not authorized"), false);
        });
    },
    authorizePublish(client, packet, callback) {
      // The broker's own $SYS topics are never writable by clients.
      if (packet.topic.startsWith("$SYS/")) return callback(new Error("$SYS is reserved"));
      const identity = client ? identities.get(client) : undefined;
      if (!identity) return callback(new Error("not allowed to publish here"));
      if (!opts.auth.canPublish(identity, packet.topic)) {
        opts.onRefusedPublish?.(identity, packet.topic);
        return callback(new Error("not allowed to publish here"));
      }
      if (!opts.onPublish) return callback(null);
      opts.onPublish(identity, packet).then(
        () => callback(null),
        (err) => {
          log(`[mqtt] publish from ${client?.id} not stored: ${String(err)}`);
          callback(err instanceof Error ? err : new Error(String(err)));
        },
      );
    },
    authorizeSubscribe(client, subscription, callback) {
      const identity = identities.get(client);
      // MQTT 3.1.1 §3.9.3: a refused subscription gets return code 0x80 in SUBACK; the
      // connection stays up (aedes grants 128 for a null subscription).
      if (!identity || !opts.auth.canSubscribe(identity, subscription.topic)) return callback(null, null);
      callback(null, subscription);
    },
  });

  aedes.on("client", (client) => {
    const identity = identities.get(client);
    if (identity) opts.onClientChange?.(identity, "connected");
  });
  aedes.on("clientDisconnect", (client) => {
    const identity = identities.get(client);
    if (identity) opts.onClientChange?.(identity, "disconnected");
  });

  const server = net.createServer(aedes.handle);
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
