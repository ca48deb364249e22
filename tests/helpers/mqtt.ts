import net from "node:net";
import mqtt, { type IClientOptions, type MqttClient } from "mqtt";
import { generate, parser, type Packet } from "mqtt-packet";
import { signIn, type TestServer } from "./server";

// Gateway-side helpers for integration tests: provision a gateway through the real API,
// upload its point map, and connect real mqtt.js clients as that gateway (or a raw socket
// that writes packets with mqtt-packet, for what mqtt.js would not send).

export const ADMIN = "admin@tallgrass.example";

export interface ProvisionedGateway {
  gateway: { id: string; siteId: string; protocol: string; groupId: string | null; edgeNodeId: string | null };
  username: string;
  password: string;
}

export async function adminCookie(server: TestServer): Promise<string> {
  const { cookie } = await signIn(server.url, ADMIN);
  if (!cookie) throw new Error("admin sign-in failed");
  return cookie;
}

// eslint-disable-next-line @typescript-eslint/no-explicit-any -- response bodies are checked field by field by the tests' assertions
type JsonBody = any;

export async function api(
  server: TestServer,
  cookie: string,
  path: string,
  init: RequestInit = {},
): Promise<{ status: number; body: JsonBody }> {
  // A cookie-authenticated request names its page's origin, as a browser's does (lib/server/origin.ts).
  const res = await fetch(`${server.url}${path}`, {
    ...init,
    headers: { cookie, origin: server.url, ...(init.headers ?? {}) },
  });
  const text = await res.text();
  let body: unknown = text;
  try {
    body = JSON.parse(text);
  } catch {
    // not JSON; keep the text
  }
  return { status: res.status, body };
}

export async function provisionGateway(
  server: TestServer,
  cookie: string,
  input: { siteId: string; name?: string; protocol?: "json" | "sparkplug"; groupId?: string; edgeNodeId?: string },
): Promise<ProvisionedGateway> {
  const res = await api(server, cookie, "/api/gateways", {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify({ name: "Test gateway", protocol: "json", ...input }),
  });
  if (res.status !== 201) throw new Error(`provisioning failed: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body as ProvisionedGateway;
}

export async function putPointMap(server: TestServer, cookie: string, gatewayId: string, csv: string) {
  return api(server, cookie, `/api/gateways/${gatewayId}/point-map`, {
    method: "PUT",
    headers: { "content-type": "text/csv" },
    body: csv,
  });
}

/**
 * Connects and resolves on CONNACK 0; rejects with the refusal (err.code = CONNACK return code).
 * The client id is the gateway id (the user name), as the broker requires.
 */
export function connectGateway(
  server: TestServer,
  creds: { username: string; password: string },
  extra: IClientOptions = {},
): Promise<MqttClient> {
  return new Promise((resolve, reject) => {
    const client = mqtt.connect(server.mqttUrl, {
      protocolVersion: 4,
      clientId: creds.username,
      username: creds.username,
      password: creds.password,
      reconnectPeriod: 0,
      connectTimeout: 10_000,
      ...extra,
    });
    client.once("connect", () => resolve(client));
    client.once("error", (err) => {
      client.end(true);
      reject(err);
    });
  });
}

export function publishQos1(client: MqttClient, topic: string, payload: string | Buffer): Promise<void> {
  return new Promise((resolve, reject) =>
    client.publish(topic, payload, { qos: 1 }, (err) => (err ? reject(err) : resolve())),
  );
}

export function endClient(client: MqttClient): Promise<void> {
  return new Promise((resolve) => client.end(false, {}, () => resolve()));
}

export async function waitFor<T>(
  fn: () => Promise<T | undefined | null | false>,
  timeoutMs = 10_000,
  stepMs = 100,
): Promise<T> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const v = await fn();
    if (v) return v;
    if (Date.now() > until) throw new Error("timed out waiting");
    await new Promise((r) => setTimeout(r, stepMs));
  }
}

/** A JSON readings message as the wire contract describes it. */
export function readingsMessage(
  readings: Array<{ point: string; value: unknown; ts?: string; quality?: string }>,
  seq = 1,
  sentAt = new Date().toISOString(),
) {
  return JSON.stringify({ seq, sentAt, readings });
}

/** A bare TCP connection to the broker: packets written as given, packets read as they come. */
export interface RawMqtt {
  socket: net.Socket;
  packets: Packet[];
  /** Resolves when the server has closed the connection. */
  closed: Promise<void>;
  send(packet: Packet): void;
  /** The CONNACK's return code, or "closed" when the connection ends without one. */
  connack(): Promise<number | "closed">;
}

export async function rawMqtt(server: TestServer): Promise<RawMqtt> {
  const socket = net.connect({ host: "127.0.0.1", port: server.mqttPort });
  await new Promise<void>((resolve, reject) => {
    socket.once("connect", () => resolve());
    socket.once("error", reject);
  });
  // The server may cut a write short; that is what these tests look for.
  socket.on("error", () => {});
  const incoming = parser({ protocolVersion: 4 });
  const packets: Packet[] = [];
  incoming.on("packet", (p: Packet) => packets.push(p));
  socket.on("data", (chunk) => incoming.parse(chunk));
  const closed = new Promise<void>((resolve) => socket.once("close", () => resolve()));
  return {
    socket,
    packets,
    closed,
    send: (packet) => void socket.write(generate(packet)),
    connack: () =>
      new Promise((resolve) => {
        const seen = () => packets.find((p) => p.cmd === "connack");
        const check = () => {
          const p = seen();
          if (p && p.cmd === "connack") resolve(p.returnCode ?? 0);
        };
        incoming.on("packet", check);
        check();
        void closed.then(() => {
          const p = seen();
          resolve(p && p.cmd === "connack" ? (p.returnCode ?? 0) : "closed");
        });
      }),
  };
}

/** True when the client's connection is closed within `ms`. */
export function closesWithin(client: MqttClient, ms: number): Promise<boolean> {
  return new Promise((resolve) => {
    const timer = setTimeout(() => resolve(false), ms);
    client.once("close", () => {
      clearTimeout(timer);
      resolve(true);
    });
  });
}

/**
 * Publishes a latched chiller alarm for `tag` through a fresh gateway and returns the id of the
 * alarm the rules raise (`cookie` must be an admin's: it provisions the gateway).
 */
export async function raiseChillerTrip(
  server: TestServer,
  cookie: string,
  siteId: string,
  tag: string,
  fault: string,
): Promise<string> {
  const gw = await provisionGateway(server, cookie, { siteId });
  const p = tag.replace("-", "");
  const csv = `gateway_point,equipment,quantity,unit\n${p}-ALM,${tag},chiller_alarm,bool\n${p}-FAULT,${tag},fault_text,text\n${p}-RUN,${tag},run_status,bool\n`;
  const map = await putPointMap(server, cookie, gw.gateway.id, csv);
  if (map.status !== 200) throw new Error(`point map refused: ${map.status} ${JSON.stringify(map.body)}`);
  const client = await connectGateway(server, gw);
  // Two samples 10 s apart: the rules evaluate every 5 s of event time.
  const t0 = Date.now() - 20_000;
  for (const [i, ts] of [t0, t0 + 10_000].entries()) {
    const at = new Date(ts).toISOString();
    const readings = [
      { point: `${p}-ALM`, value: true, ts: at },
      { point: `${p}-FAULT`, value: fault, ts: at },
      { point: `${p}-RUN`, value: false, ts: at },
    ];
    await client.publishAsync(`liftline/${gw.gateway.id}/readings`, JSON.stringify({ seq: i, sentAt: at, readings }), {
      qos: 1,
    });
  }
  await client.endAsync();
  return waitFor(
    async () => {
      const { body } = await api(server, cookie, `/api/alarms?site=${siteId}`);
      const found = (body.alarms as Array<{ id: string; ruleId: string; equipment: string }> | undefined)?.find(
        (a) => a.ruleId === "chiller_tripped" && a.equipment === tag,
      );
      return found?.id;
    },
    10_000,
    200,
  );
}
