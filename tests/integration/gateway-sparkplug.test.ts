import type { MqttClient } from "mqtt";
import sparkplugPayload from "sparkplug-payload";
import { newClient } from "sparkplug-client";

type SparkplugClient = ReturnType<typeof newClient>;
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startServer, type TestServer } from "../helpers/server";
import { adminCookie, api, provisionGateway, putPointMap, waitFor, type ProvisionedGateway } from "../helpers/mqtt";

// A real Sparkplug B edge node (the npm sparkplug-client package) against the embedded
// broker: NBIRTH declares metrics with aliases, NDATA/DDATA carry values by alias, a seq gap
// is answered with an NCMD rebirth request, and NDEATH marks the node offline.

const SITE = "millbrook-high";
const codec = sparkplugPayload.get("spBv1.0")!;
let server: TestServer;
let admin: string;
let gw: ProvisionedGateway;
let node: SparkplugClient;
let pointIds: Record<string, number>;

async function latestOf(pointId: number) {
  const res = await api(server, admin, `/api/sites/${SITE}/latest`);
  return res.body.latest.points.find((p: { pointId: number }) => p.pointId === pointId) as {
    value: unknown;
    tsMs: number | null;
  };
}

beforeAll(async () => {
  server = await startServer();
  admin = await adminCookie(server);
  gw = await provisionGateway(server, admin, {
    siteId: SITE,
    name: "Sparkplug node",
    protocol: "sparkplug",
    groupId: "millbrook",
    edgeNodeId: "plant-edge-1",
  });
  const csv = [
    "gateway_point,equipment,quantity,unit",
    "CH1/LCHWT,CH-1,chilled_water_leaving_temp,degF",
    "CH1/Running,CH-1,run_status,bool",
    "Tower/FanSpeed,CT-1,fan_speed,%",
    "Tower/Mode,CT-1,fan_drive_mode,state",
  ].join("\n");
  expect((await putPointMap(server, admin, gw.gateway.id, csv)).body.accepted).toBe(4);
  const site = await api(server, admin, `/api/sites/${SITE}`);
  const find = (tag: string, key: string) =>
    site.body.site.equipment
      .find((e: { tag: string }) => e.tag === tag)
      .points.find((p: { key: string }) => p.key === key).id;
  pointIds = {
    lchwt: find("CH-1", "chilled_water_leaving_temp"),
    run: find("CH-1", "run_status"),
    fan: find("CT-1", "fan_speed"),
    mode: find("CT-1", "fan_drive_mode"),
  };
}, 240_000);

afterAll(async () => {
  node?.stop();
  await server?.stop();
});

describe("Sparkplug B edge node", () => {
  it("stores NBIRTH and NDATA metrics, by name and by alias", async () => {
    node = newClient({
      serverUrl: server.mqttUrl,
      username: gw.username,
      password: gw.password,
      groupId: "millbrook",
      edgeNode: "plant-edge-1",
      // gateway/PROTOCOL.md: the client id is the gateway id (the user name).
      clientId: gw.username,
      version: "spBv1.0",
    });
    await new Promise<void>((resolve) => node.on("birth", () => resolve()));
    const t = Date.now() - 2000;
    node.publishNodeBirth({
      timestamp: t,
      metrics: [
        { name: "CH1/LCHWT", alias: 1, type: "Float", value: 44.0, timestamp: t },
        { name: "CH1/Running", alias: 2, type: "Boolean", value: true, timestamp: t },
        { name: "Node Control/Rebirth", type: "Boolean", value: false },
      ],
    });
    node.publishDeviceBirth("Tower", {
      timestamp: t,
      metrics: [
        { name: "FanSpeed", alias: 10, type: "Double", value: 55.5, timestamp: t },
        { name: "Mode", alias: 11, type: "String", value: "auto", timestamp: t },
      ],
    });
    await waitFor(async () => (await latestOf(pointIds.fan)).value === 55.5);
    expect((await latestOf(pointIds.lchwt)).value).toBeCloseTo((44 - 32) / 1.8, 5); // NIST SP 811 B.9
    expect((await latestOf(pointIds.run)).value).toBe(true);
    expect((await latestOf(pointIds.mode)).value).toBe("auto");

    // NDATA by alias only (Sparkplug B 3.0 §6.4.3: aliases replace names after the birth).
    const t2 = Date.now() - 1000;
    node.publishNodeData({ timestamp: t2, metrics: [{ alias: 1, type: "Float", value: 46.4, timestamp: t2 }] });
    node.publishDeviceData("Tower", {
      timestamp: t2,
      metrics: [{ alias: 10, type: "Double", value: 61.25, timestamp: t2 }],
    });
    await waitFor(async () => (await latestOf(pointIds.fan)).value === 61.25);
    const l = await latestOf(pointIds.lchwt);
    expect(l.value).toBeCloseTo((46.4 - 32) / 1.8, 5);
    expect(l.tsMs).toBe(t2);

    const status = await api(server, admin, `/api/gateways/${gw.gateway.id}`);
    expect(status.body.gateway.status.online).toBe(true);
    expect(status.body.gateway.counters.readingsAccepted).toBe(6);
  });

  it("answers a seq gap with an NCMD Node Control/Rebirth", async () => {
    // The node's own session hears its commands (sparkplug-client subscribes to NCMD); a gateway
    // has one connection, its client id being its gateway id.
    const command = new Promise<{ name: string; value: unknown }[]>((resolve) =>
      node.once("ncmd", (payload) => resolve(payload.metrics as { name: string; value: unknown }[])),
    );
    // Skip two sequence numbers (§6.4.5: seq must increase by one per message).
    // sparkplug-client keeps its counter private; reach it the way a faulty node would skip.
    const internals = node as unknown as { incrementSeqNum(): number; connected: boolean };
    internals.incrementSeqNum();
    internals.incrementSeqNum();
    node.publishNodeData({
      timestamp: Date.now(),
      metrics: [{ alias: 2, type: "Boolean", value: false, timestamp: Date.now() }],
    });
    const metrics = await command;
    expect(metrics).toEqual([expect.objectContaining({ name: "Node Control/Rebirth", value: true })]);
  });

  it("marks the node offline on an NDEATH whose bdSeq matches the birth (§6.4.7), while it is still connected", async () => {
    // The NDEATHs go out on the node's own connection, which stays up (sparkplug-client's own
    // mqtt.js has no publishAsync).
    const own = (node as unknown as { client: MqttClient }).client;
    const publishOwn = (topic: string, payload: Buffer) =>
      new Promise<void>((resolve, reject) =>
        own.publish(topic, payload, { qos: 1 }, (e) => (e ? reject(e) : resolve())),
      );
    const death = (bdSeq: number) =>
      Buffer.from(
        codec.encodePayload({ timestamp: Date.now(), metrics: [{ name: "bdSeq", type: "UInt64", value: bdSeq }] }),
      );
    const statusOf = async () => (await api(server, admin, `/api/gateways/${gw.gateway.id}`)).body.gateway.status;
    await waitFor(async () => (await statusOf()).online);

    // An NDEATH of an older session (bdSeq 7; the birth carried sparkplug-client's 0) is ignored.
    await publishOwn("spBv1.0/millbrook/NDEATH/plant-edge-1", death(7));
    expect((await statusOf()).online).toBe(true);

    await publishOwn("spBv1.0/millbrook/NDEATH/plant-edge-1", death(0));
    const s = await statusOf();
    expect(s.state).toBe("offline");
    expect(s.online).toBe(false);
    expect((node as unknown as { connected: boolean }).connected).toBe(true);
  });
});
