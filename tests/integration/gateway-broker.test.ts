import fs from "node:fs";
import type { MqttClient } from "mqtt";
import sparkplugPayload from "sparkplug-payload";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startServer, type TestServer } from "../helpers/server";
import {
  adminCookie,
  api,
  closesWithin,
  connectGateway,
  endClient,
  provisionGateway,
  rawMqtt,
  type ProvisionedGateway,
} from "../helpers/mqtt";

// The embedded broker's own limits, against the real server: a gateway's client id is its
// gateway id, keep alive within 1–300 s, packet sizes bounded before and after CONNECT,
// retained messages only on the JSON status topic, and $SYS/ refused and counted.

const codec = sparkplugPayload.get("spBv1.0")!;
const MB = 1024 * 1024;
let server: TestServer;
let admin: string;
let gwJson: ProvisionedGateway;

async function rejected(gw: ProvisionedGateway): Promise<Record<string, number>> {
  const res = await api(server, admin, `/api/gateways/${gw.gateway.id}`);
  expect(res.status).toBe(200);
  return res.body.gateway.counters.rejected;
}

async function rejectedDelta(gw: ProvisionedGateway, before: Record<string, number>, reason: string, n: number) {
  const deadline = Date.now() + 10_000;
  let now = await rejected(gw);
  while ((now[reason] ?? 0) - (before[reason] ?? 0) < n && Date.now() < deadline) {
    await new Promise((r) => setTimeout(r, 100));
    now = await rejected(gw);
  }
  return (now[reason] ?? 0) - (before[reason] ?? 0);
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** MQTT 3.1.1 §2.2.3: 7 bits a byte, least significant first, high bit = more bytes follow. */
function remainingLength(n: number): Buffer {
  const bytes: number[] = [];
  do {
    let b = n % 128;
    n = Math.floor(n / 128);
    if (n > 0) b |= 0x80;
    bytes.push(b);
  } while (n > 0);
  return Buffer.from(bytes);
}

const u16 = (n: number) => Buffer.from([n >> 8, n & 0xff]);

/** Bytes the process has passed to read(2) and the like, sockets included (proc(5), /proc/pid/io). */
function readBytes(pid: number): number {
  const m = /rchar:\s+(\d+)/.exec(fs.readFileSync(`/proc/${pid}/io`, "utf8"));
  if (!m) throw new Error("no rchar");
  return Number(m[1]);
}

function rssBytes(pid: number): number {
  const m = /VmRSS:\s+(\d+) kB/.exec(fs.readFileSync(`/proc/${pid}/status`, "utf8"));
  if (!m) throw new Error("no VmRSS");
  return Number(m[1]) * 1024;
}

/**
 * The server's RSS once it has held within 1 MB for a second (a development server keeps
 * working for a while after compiling a route), at most 15 s on.
 */
async function settledRss(pid: number): Promise<number> {
  const until = Date.now() + 15_000;
  for (;;) {
    const samples: number[] = [];
    for (let i = 0; i < 10; i++) {
      samples.push(rssBytes(pid));
      await sleep(100);
    }
    const high = Math.max(...samples);
    if (high - Math.min(...samples) < MB || Date.now() > until) return high;
  }
}

beforeAll(async () => {
  server = await startServer();
  admin = await adminCookie(server);
  gwJson = await provisionGateway(server, admin, { siteId: "harborview-mob", name: "Limits" });
}, 240_000);

afterAll(async () => {
  await server?.stop();
});

describe("client id bound to the gateway", () => {
  it("refuses another organization's gateway claiming a connected gateway's client id with CONNACK 2 (MQTT 3.1.1 §3.2.2.3); the owner keeps its connection and its commands", async () => {
    // A: a Sparkplug node at Quarry Ridge; B: a JSON gateway at Harborview (another customer).
    const a = await provisionGateway(server, admin, {
      siteId: "quarry-ridge-dh2",
      name: "Node A",
      protocol: "sparkplug",
      groupId: "quarry",
      edgeNodeId: "edge-a",
    });
    const b = await provisionGateway(server, admin, { siteId: "harborview-mob", name: "Gateway B" });
    const owner = await connectGateway(server, a, { clean: false });
    let ownerClosed = false;
    owner.on("close", () => (ownerClosed = true));
    await owner.subscribeAsync("spBv1.0/quarry/NCMD/edge-a", { qos: 1 });

    await expect(connectGateway(server, b, { clientId: a.username, clean: false })).rejects.toMatchObject({ code: 2 });

    // A command still reaches A: DATA before any birth is answered with an NCMD rebirth request
    // (gateway/PROTOCOL.md; Sparkplug B 3.0 §6.4.16).
    const command = new Promise<{ topic: string; metrics: Array<{ name: string; value: unknown }> }>((resolve) =>
      owner.once("message", (topic, payload) =>
        resolve({
          topic,
          metrics: codec.decodePayload(new Uint8Array(payload)).metrics as Array<{ name: string; value: unknown }>,
        }),
      ),
    );
    owner.publish(
      "spBv1.0/quarry/NDATA/edge-a",
      Buffer.from(codec.encodePayload({ timestamp: Date.now(), seq: 0, metrics: [] })),
      { qos: 0 },
    );
    expect(await command).toEqual({
      topic: "spBv1.0/quarry/NCMD/edge-a",
      metrics: [expect.objectContaining({ name: "Node Control/Rebirth", value: true })],
    });
    expect(ownerClosed).toBe(false);
    expect(owner.connected).toBe(true);

    const own = await connectGateway(server, b);
    await endClient(own);
    await endClient(owner);
  });

  it("refuses an empty client id with CONNACK 2 (MQTT 3.1.1 §3.1.3.1, [MQTT-3.1.3-9])", async () => {
    const raw = await rawMqtt(server);
    raw.send({
      cmd: "connect",
      protocolId: "MQTT",
      protocolVersion: 4,
      clientId: "",
      clean: true,
      keepalive: 60,
      username: gwJson.username,
      password: Buffer.from(gwJson.password),
    });
    expect(await raw.connack()).toBe(2);
    await raw.closed;
  });
});

describe("keep alive", () => {
  const connectWith = async (keepalive: number) => {
    const raw = await rawMqtt(server);
    raw.send({
      cmd: "connect",
      protocolId: "MQTT",
      protocolVersion: 4,
      clientId: gwJson.username,
      clean: true,
      keepalive,
      username: gwJson.username,
      password: Buffer.from(gwJson.password),
    });
    const answer = await raw.connack();
    raw.socket.destroy();
    return answer;
  };

  it("closes a gateway's CONNECT with keep alive 0 or over 300 s without a CONNACK (MQTT 3.1.1 §3.2.2.3, [MQTT-3.2.2-6]); 1 and 300 s connect", async () => {
    expect(await connectWith(0)).toBe("closed");
    expect(await connectWith(301)).toBe("closed");
    expect(await connectWith(65_535)).toBe("closed");
    expect(await connectWith(300)).toBe(0);
    expect(await connectWith(1)).toBe(0);
  });
});

describe("packet size", () => {
  it("closes a connection whose first packet is a 100 MB PUBLISH, without reading it or holding it in memory", async () => {
    const pid = server.process.pid!;
    const before = await settledRss(pid);
    const readBefore = readBytes(pid);
    let peak = before;
    const sampler = setInterval(() => (peak = Math.max(peak, rssBytes(pid))), 5);
    const raw = await rawMqtt(server);
    try {
      // A QoS 0 PUBLISH header (MQTT 3.1.1 §3.3) declaring 100 MB of payload, then the payload 1 MB at a time.
      const topic = Buffer.from(`liftline/${gwJson.gateway.id}/readings`);
      const payloadBytes = 100 * MB;
      raw.socket.write(
        Buffer.concat([
          Buffer.from([0x30]),
          remainingLength(2 + topic.length + payloadBytes),
          u16(topic.length),
          topic,
        ]),
      );
      const chunk = Buffer.alloc(MB, 0x20);
      const drained = () => new Promise<void>((resolve) => raw.socket.once("drain", resolve).once("close", resolve));
      for (let sent = 0; sent < payloadBytes && !raw.socket.destroyed; sent += chunk.length) {
        if (!raw.socket.write(chunk)) await drained();
      }
      await raw.closed;
      await sleep(300);
    } finally {
      clearInterval(sampler);
    }
    const read = readBytes(pid) - readBefore;
    const grew = peak - before;
    // MQTT 3.1.1 §3.1 [MQTT-3.1.0-1]: the first packet must be CONNECT.
    expect(raw.packets).toEqual([]);
    // What the server never read, it cannot hold: a socket read or two of 64 KB.
    expect(read, `the server read ${(read / MB).toFixed(1)} MB`).toBeLessThan(4 * MB);
    // A development server's RSS moves by up to ~30 MB on its own (Next rebuilding idle entries,
    // 64 MB young-generation semi-spaces), so this bound is well above that and well below 100 MB.
    expect(grew, `server RSS grew by ${(grew / MB).toFixed(1)} MB`).toBeLessThan(48 * MB);
  }, 60_000);

  it("closes a CONNECT over 4 KB without a CONNACK", async () => {
    const raw = await rawMqtt(server);
    raw.send({
      cmd: "connect",
      protocolId: "MQTT",
      protocolVersion: 4,
      clientId: gwJson.username,
      clean: true,
      keepalive: 60,
      username: gwJson.username,
      password: Buffer.alloc(16 * 1024, 0x61),
    });
    expect(await raw.connack()).toBe("closed");
  });

  it("closes a gateway's connection on a packet over 1 MB and counts it too_large", async () => {
    const before = await rejected(gwJson);
    const c = await connectGateway(server, gwJson);
    const gone = closesWithin(c, 5000);
    c.publish(`liftline/${gwJson.gateway.id}/readings`, Buffer.alloc(2 * MB, 0x20), { qos: 1 });
    expect(await gone).toBe(true);
    c.end(true);
    expect(await rejectedDelta(gwJson, before, "too_large", 1)).toBe(1);
  });
});

describe("retained messages", () => {
  let gw: ProvisionedGateway;
  beforeAll(async () => {
    gw = await provisionGateway(server, admin, { siteId: "harborview-mob", name: "Retain" });
  });
  const topic = (channel: string) => `liftline/${gw.gateway.id}/${channel}`;

  async function publishRetained(channel: string, payload: string | Buffer): Promise<boolean> {
    const c = await connectGateway(server, gw);
    const gone = closesWithin(c, 3000);
    c.publish(topic(channel), payload, { qos: 1, retain: true });
    const wasClosed = await gone;
    c.end(true);
    return wasClosed;
  }

  it("keeps the status topic's retained online/offline", async () => {
    const c = await connectGateway(server, gw);
    await c.publishAsync(topic("status"), "online", { qos: 1, retain: true });
    await sleep(200);
    expect(c.connected).toBe(true);
    await endClient(c);
  });

  it("refuses a large retained message (too_large) and a retained one outside the status topic (invalid_message), closing the connection (MQTT 3.1.1 §3.3.5); a new subscriber gets neither", async () => {
    const before = await rejected(gw);
    expect(await publishRetained("commands", Buffer.alloc(64 * 1024, 0x78))).toBe(true);
    expect(await publishRetained("status", "online".padEnd(300, " "))).toBe(true);
    expect(await publishRetained("commands", "restart")).toBe(true);
    expect(await rejectedDelta(gw, before, "too_large", 2)).toBe(2);
    expect(await rejectedDelta(gw, before, "invalid_message", 1)).toBe(1);

    // MQTT 3.1.1 §3.3.1.3: a retained message goes to every new subscription of its topic.
    const sub: MqttClient = await connectGateway(server, gw);
    const got: Buffer[] = [];
    sub.on("message", (_t, payload) => got.push(payload));
    await sub.subscribeAsync(topic("commands"), { qos: 1 });
    await sleep(500);
    expect(got.map((p) => p.length)).toEqual([]);
    await endClient(sub);
  });
});

describe("$SYS/", () => {
  it("refuses a gateway's publish under $SYS/ and counts it foreign_topic (gateway/PROTOCOL.md)", async () => {
    const before = await rejected(gwJson);
    const c = await connectGateway(server, gwJson);
    const gone = closesWithin(c, 5000);
    c.publish("$SYS/broker/fake", "x", { qos: 1 });
    expect(await gone).toBe(true);
    c.end(true);
    expect(await rejectedDelta(gwJson, before, "foreign_topic", 1)).toBe(1);
  });
});
