import mqtt, { type MqttClient } from "mqtt";
import { afterAll, afterEach, beforeAll, describe, expect, it } from "vitest";
import { startEmbeddedBroker, type BrokerAuth, type ClientIdentity, type EmbeddedBroker } from "@/gateway/broker";

// The embedded broker in-process on a free port, with stub auth and callbacks that throw, as a
// database write on a full disk would: every CONNECT still gets its CONNACK and nothing escapes
// as an uncaught exception.

const gateway = (id: string): ClientIdentity => ({
  kind: "gateway",
  gatewayId: id,
  siteId: "site-1",
  protocol: "json",
  groupId: null,
  edgeNodeId: null,
});

let fail = {
  authenticate: false,
  authenticateSync: false,
  canPublish: false,
  canSubscribe: false,
  clientChange: false,
  onPublish: false,
};
const auth: BrokerAuth = {
  acceptsKeepalive: () => true,
  authenticate({ username }) {
    if (fail.authenticateSync) throw new Error("database is locked");
    if (fail.authenticate) return Promise.reject(new Error("SQLITE_FULL: database or disk is full"));
    return Promise.resolve(gateway(username ?? ""));
  },
  refuseRetained: () => null,
  canPublish(_identity, topic) {
    if (fail.canPublish) throw new Error("boom");
    return topic.startsWith("liftline/");
  },
  canSubscribe() {
    if (fail.canSubscribe) throw new Error("boom");
    return true;
  },
};

let broker: EmbeddedBroker;
const logged: string[] = [];
const uncaught: unknown[] = [];
const onUncaught = (err: unknown) => uncaught.push(err);
const clients: MqttClient[] = [];

function connect(id: string): Promise<{ client: MqttClient; returnCode: number }> {
  return new Promise((resolve, reject) => {
    const client = mqtt.connect(`mqtt://127.0.0.1:${broker.port}`, {
      clientId: id,
      username: id,
      password: "pw",
      protocolVersion: 4,
      reconnectPeriod: 0,
      connectTimeout: 5000,
    });
    clients.push(client);
    client.on("packetreceive", (p) => {
      if (p.cmd === "connack") resolve({ client, returnCode: p.returnCode ?? 0 });
    });
    client.on("error", () => {});
    client.once("close", () => reject(new Error("closed without CONNACK")));
  });
}

beforeAll(async () => {
  process.on("uncaughtException", onUncaught);
  broker = await startEmbeddedBroker({
    host: "127.0.0.1",
    port: 0,
    auth,
    onPublish: () => (fail.onPublish ? Promise.reject(new Error("SQLITE_FULL")) : Promise.resolve()),
    onClientChange: () => {
      if (fail.clientChange) throw new Error("SQLITE_FULL: database or disk is full");
    },
    log: (line) => logged.push(line),
  });
});

afterEach(() => {
  for (const c of clients.splice(0)) c.end(true);
  fail = {
    authenticate: false,
    authenticateSync: false,
    canPublish: false,
    canSubscribe: false,
    clientChange: false,
    onPublish: false,
  };
});

afterAll(async () => {
  await broker.close();
  process.off("uncaughtException", onUncaught);
});

describe("broker handlers never throw", () => {
  it("answers CONNACK 0 when the presence callback throws, and logs it", async () => {
    fail.clientChange = true;
    const { client, returnCode } = await connect("gw-presence");
    expect(returnCode).toBe(0);
    await client.endAsync();
    await new Promise((r) => setTimeout(r, 100));
    expect(logged.some((l) => l.includes("SQLITE_FULL"))).toBe(true);
    expect(uncaught).toEqual([]);
  });

  it("answers CONNACK 3, server unavailable (MQTT 3.1.1 §3.2.2.3), when authentication fails or throws", async () => {
    fail.authenticate = true;
    expect((await connect("gw-auth-rejects")).returnCode).toBe(3);
    fail.authenticate = false;
    fail.authenticateSync = true;
    expect((await connect("gw-auth-throws")).returnCode).toBe(3);
    expect(uncaught).toEqual([]);
  });

  it("closes the connection when the publish check throws, and keeps serving others", async () => {
    fail.canPublish = true;
    const { client } = await connect("gw-pub");
    const closed = new Promise<void>((r) => client.once("close", () => r()));
    client.publish("liftline/gw-pub/readings", "{}", { qos: 1 });
    await closed;
    fail.canPublish = false;
    const other = await connect("gw-after");
    expect(other.returnCode).toBe(0);
    await other.client.publishAsync("liftline/gw-after/readings", "{}", { qos: 1 });
    expect(uncaught).toEqual([]);
  });

  it("refuses a subscription (SUBACK 0x80, §3.9.3) when the subscribe check throws", async () => {
    fail.canSubscribe = true;
    const { client } = await connect("gw-sub");
    const granted = new Promise<number[]>((resolve) =>
      client.on("packetreceive", (p) => p.cmd === "suback" && resolve(p.granted as number[])),
    );
    client.subscribe("liftline/gw-sub/commands", { qos: 1 }, () => {});
    expect(await granted).toEqual([128]);
    expect(uncaught).toEqual([]);
  });
});
