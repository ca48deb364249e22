import net from "node:net";
import { generate, parser, type Packet } from "mqtt-packet";

// The benchmark's gateways: an MQTT 3.1.1 client that does only what a bench gateway needs
// (CONNECT, QoS 1 PUBLISH, PUBACK by packet id), with packets written by mqtt-packet, the
// codec aedes and mqtt.js themselves use. The load generator shares this machine's 2 cores
// with the server, so each cycle it spends is one the server does not get: in short 20-reading
// capacity runs the bench process used 44–53 % of a core with mqtt.js (its stores, streams and
// a writev per publish) and 30–32 % with this. The test suite's gateways stay real mqtt.js and
// sparkplug-client clients.

export interface BenchGatewayConnection {
  /** QoS 1 publish; `onAck` runs when its PUBACK arrives. */
  publish(topic: string, payload: string, onAck: () => void): void;
  end(): void;
}

/** Keep alive of the bench's CONNECT; a PINGREQ goes out at half of it (MQTT 3.1.1 §3.1.2.10). */
const KEEPALIVE_S = 60;

export interface BenchGatewayOptions {
  /** Defaults to the user name (the gateway id), as the broker requires (gateway/PROTOCOL.md). */
  clientId?: string;
  username: string;
  password: string;
  timeoutMs?: number;
  /** The local address to connect from (e.g. 127.0.0.2), so tests can appear as another host. */
  localAddress?: string;
}

/** Connects and resolves on CONNACK 0; rejects with the return code otherwise. */
export async function connectBenchGateway(url: string, opts: BenchGatewayOptions): Promise<BenchGatewayConnection> {
  const { returnCode, connection } = await openBenchGateway(url, opts);
  if (!connection) throw new Error(`${opts.clientId ?? opts.username}: CONNACK return code ${returnCode}`);
  return connection;
}

/**
 * Sends CONNECT and resolves with the CONNACK's return code (MQTT 3.1.1 §3.2.2.3), with the
 * connection when it is 0; a refused one is closed. Rejects when no CONNACK comes.
 */
export function openBenchGateway(
  url: string,
  opts: BenchGatewayOptions,
): Promise<{ returnCode: number; connection: BenchGatewayConnection | null }> {
  const { hostname, port } = new URL(url);
  const clientId = opts.clientId ?? opts.username;
  return new Promise((resolve, reject) => {
    const socket = net.connect({ host: hostname, port: Number(port), noDelay: true, localAddress: opts.localAddress });
    const incoming = parser({ protocolVersion: 4 });
    // MQTT 3.1.1 §2.3.1: a packet id is in use until its PUBACK; ids are 1..65535.
    const waiting: Array<(() => void) | undefined> = new Array(65_536);
    let nextId = 1;
    let connected = false;
    const timer = setTimeout(() => fail(new Error(`${clientId}: no CONNACK in time`)), opts.timeoutMs ?? 120_000);
    const fail = (err: Error) => {
      clearTimeout(timer);
      socket.destroy();
      reject(err);
    };

    incoming.on("packet", (p: Packet) => {
      if (p.cmd === "puback") {
        const done = waiting[p.messageId!];
        waiting[p.messageId!] = undefined;
        done?.();
      } else if (p.cmd === "connack") {
        clearTimeout(timer);
        if (p.returnCode !== 0) {
          socket.destroy();
          return resolve({ returnCode: p.returnCode!, connection: null });
        }
        connected = true;
        const ping = setInterval(() => socket.write(generate({ cmd: "pingreq" })), (KEEPALIVE_S * 1000) / 2);
        ping.unref();
        socket.once("close", () => clearInterval(ping));
        resolve({
          returnCode: 0,
          connection: {
            publish(topic, payload, onAck) {
              let id = nextId;
              // Skip ids still waiting (only after 65,535 publishes without their PUBACK).
              while (waiting[id]) id = (id % 65_535) + 1;
              nextId = (id % 65_535) + 1;
              waiting[id] = onAck;
              socket.write(
                generate({ cmd: "publish", topic, payload, qos: 1, messageId: id, retain: false, dup: false }),
              );
            },
            end: () => socket.destroy(),
          },
        });
      }
    });
    incoming.on("error", (err) => (connected ? socket.destroy(err) : fail(err)));
    socket.on("data", (chunk) => incoming.parse(chunk));
    // After CONNACK a lost connection shows in the bench as acknowledgements that stop; say why.
    socket.on("error", (err) => (connected ? console.error(`${clientId}: ${err.message}`) : fail(err)));
    socket.on("close", () =>
      connected ? undefined : fail(new Error(`${clientId}: connection closed before CONNACK`)),
    );
    socket.once("connect", () =>
      socket.write(
        generate({
          cmd: "connect",
          protocolId: "MQTT",
          protocolVersion: 4,
          clientId,
          clean: true,
          keepalive: KEEPALIVE_S,
          username: opts.username,
          password: Buffer.from(opts.password),
        }),
      ),
    );
  });
}
