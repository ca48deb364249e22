import type { MqttClient } from "mqtt";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { signIn, startServer, type TestServer } from "../helpers/server";
import {
  adminCookie,
  api,
  connectGateway,
  endClient,
  provisionGateway,
  publishQos1,
  putPointMap,
  readingsMessage,
  waitFor,
  type ProvisionedGateway,
} from "../helpers/mqtt";

// Real mqtt.js gateways against the real server (embedded broker) on ephemeral ports:
// JSON readings stored and served by the series API, refused credentials, refused
// cross-gateway topics, a bad-input corpus and QoS 1 redelivery.

const SITE = "harborview-mob";
const POINT_MAP = [
  "gateway_point,equipment,quantity,unit",
  "CH1-LCHWT,CH-1,chilled_water_leaving_temp,degF",
  "CH1-EVAP,CH-1,evaporator_refrigerant_pressure,psig",
  "CH1-RUN,CH-1,run_status,bool",
  "CT1-MODE,CT-1,fan_drive_mode,state",
  "CH1-FAULT,CH-1,fault_text,text",
  "CH1-KW,CH-1,compressor_power,kW",
].join("\n");

let server: TestServer;
let admin: string;
let gwA: ProvisionedGateway;
let gwB: ProvisionedGateway;
let clientA: MqttClient;
let lchwtPointId: number;

const topicOf = (gw: ProvisionedGateway, channel = "readings") => `liftline/${gw.gateway.id}/${channel}`;
const iso = (ms: number) => new Date(ms).toISOString();

async function gatewayStatus(gw: ProvisionedGateway) {
  const res = await api(server, admin, `/api/gateways/${gw.gateway.id}`);
  expect(res.status).toBe(200);
  return res.body.gateway as {
    counters: {
      messages: number;
      readingsAccepted: number;
      readingsDuplicate: number;
      rejected: Record<string, number>;
    };
    unmapped: Array<{ point: string; count: number }>;
    status: { online: boolean };
  };
}

function closed(client: MqttClient): Promise<void> {
  return new Promise((resolve) => client.once("close", () => resolve()));
}

beforeAll(async () => {
  server = await startServer();
  admin = await adminCookie(server);
  gwA = await provisionGateway(server, admin, { siteId: SITE, name: "Gateway A" });
  gwB = await provisionGateway(server, admin, { siteId: SITE, name: "Gateway B" });
  for (const gw of [gwA, gwB])
    expect((await putPointMap(server, admin, gw.gateway.id, POINT_MAP)).body).toEqual({ accepted: 6, errors: [] });
  const site = await api(server, admin, `/api/sites/${SITE}`);
  const ch1 = site.body.site.equipment.find((e: { tag: string }) => e.tag === "CH-1");
  lchwtPointId = ch1.points.find((p: { key: string }) => p.key === "chilled_water_leaving_temp").id;
  clientA = await connectGateway(server, gwA);
}, 240_000);

afterAll(async () => {
  if (clientA?.connected) await endClient(clientA);
  await server?.stop();
});

describe("JSON gateway ingest", () => {
  it("stores published readings and returns them from the series API in the viewer's units", async () => {
    const t0 = Date.now() - 60_000;
    const values = [44.3, 45.1, 43.9];
    await publishQos1(
      clientA,
      topicOf(gwA),
      readingsMessage(values.map((v, i) => ({ point: "CH1-LCHWT", value: v, ts: iso(t0 + i * 5000) }))),
    );

    // PUBACK came after the commit, so the readings are readable right away.
    const res = await api(
      server,
      admin,
      `/api/points/${lchwtPointId}/series?from=${iso(t0 - 1000)}&to=${iso(t0 + 60_000)}&maxPoints=100`,
    );
    expect(res.status).toBe(200);
    const s = res.body.series;
    expect(s.source).toBe("raw");
    expect(s.time).toEqual([t0, t0 + 5000, t0 + 10_000]);
    // The admin's preference is IP: degF in, stored as degC, shown as degF again.
    expect(s.unit).toBe("°F");
    s.avg.forEach((v: number, i: number) => expect(v).toBeCloseTo(values[i], 9));

    // Stored canonically: (44.3 − 32) / 1.8 °C (NIST SP 811 B.9), the last one is the latest.
    const latest = await api(server, admin, `/api/sites/${SITE}/latest`);
    const p = latest.body.latest.points.find((x: { pointId: number }) => x.pointId === lchwtPointId);
    expect(p.unit).toBe("degC");
    expect(p.value).toBeCloseTo((43.9 - 32) / 1.8, 9);
    expect(p.tsMs).toBe(t0 + 10_000);
    expect(p.stale).toBe(true); // 50 s old at a 5 s expected interval: older than 3×
  });

  it("picks 1-minute or 1-hour rollups for long ranges and keeps spikes as bucket min/max", async () => {
    const base = Math.floor((Date.now() - 3 * 3_600_000) / 60_000) * 60_000;
    const readings = [];
    for (let m = 0; m < 30; m++) {
      for (let k = 0; k < 6; k++)
        readings.push({
          point: "CH1-KW",
          value: m === 17 && k === 3 ? 900 : 200,
          ts: iso(base + m * 60_000 + k * 10_000),
        });
    }
    await publishQos1(clientA, topicOf(gwA), readingsMessage(readings));
    const site = await api(server, admin, `/api/sites/${SITE}`);
    const kwId = site.body.site.equipment
      .find((e: { tag: string }) => e.tag === "CH-1")
      .points.find((p: { key: string }) => p.key === "compressor_power").id;
    // 24 h in 10 buckets reads hours; 3 h in 100 buckets reads minutes (108 s wide → 2 min).
    for (const [hours, maxPoints, source] of [
      [24, 10, "rollup_1h"],
      [3, 100, "rollup_1m"],
    ] as const) {
      const res = await api(
        server,
        admin,
        `/api/points/${kwId}/series?from=${base}&to=${base + hours * 3_600_000}&maxPoints=${maxPoints}`,
      );
      expect(res.status).toBe(200);
      const s = res.body.series;
      expect(s.source).toBe(source);
      expect(s.time.length).toBeLessThanOrEqual(maxPoints);
      expect(Math.max(...s.max)).toBe(900);
      expect(Math.min(...s.min)).toBe(200);
      expect(s.count.reduce((a: number, b: number) => a + b, 0)).toBe(180);
    }
  });

  it("lets a customer read its own site's series and latest values, never another site's", async () => {
    const own = await signIn(server.url, "facilities@harborview.example");
    const other = await signIn(server.url, "ops@quarryridge.example");
    expect((await api(server, own.cookie!, `/api/points/${lchwtPointId}/series`)).status).toBe(200);
    expect((await api(server, own.cookie!, `/api/sites/${SITE}/latest`)).status).toBe(200);
    expect((await api(server, other.cookie!, `/api/points/${lchwtPointId}/series`)).status).toBe(404);
    expect((await api(server, other.cookie!, `/api/sites/${SITE}/latest`)).status).toBe(404);
    expect((await api(server, other.cookie!, `/api/gateways/${gwA.gateway.id}`)).status).toBe(404);
  });

  it("a redelivered QoS 1 message adds nothing", async () => {
    const before = await gatewayStatus(gwA);
    const msg = readingsMessage([{ point: "CH1-KW", value: 321, ts: iso(Date.now() - 2000) }], 99);
    await publishQos1(clientA, topicOf(gwA), msg);
    await publishQos1(clientA, topicOf(gwA), msg);
    const after = await gatewayStatus(gwA);
    expect(after.counters.readingsAccepted - before.counters.readingsAccepted).toBe(1);
    expect(after.counters.readingsDuplicate - before.counters.readingsDuplicate).toBe(1);
    expect(after.counters.messages - before.counters.messages).toBe(2);
  });
});

describe("broker access control", () => {
  it("refuses a wrong password and an unknown user with CONNACK 4 (MQTT 3.1.1 §3.2.2.3)", async () => {
    await expect(connectGateway(server, { username: gwA.username, password: "wrong-password" })).rejects.toMatchObject({
      code: 4,
    });
    await expect(connectGateway(server, { username: "gw-nobody", password: gwA.password })).rejects.toMatchObject({
      code: 4,
    });
  });

  it("refuses a revoked gateway with CONNACK 5 and drops its live connection", async () => {
    const gwC = await provisionGateway(server, admin, { siteId: SITE, name: "Gateway C" });
    const c = await connectGateway(server, gwC);
    const gone = closed(c);
    expect((await api(server, admin, `/api/gateways/${gwC.gateway.id}/revoke`, { method: "POST" })).status).toBe(200);
    await gone;
    c.end(true);
    await expect(connectGateway(server, gwC)).rejects.toMatchObject({ code: 5 });
  });

  it("rotating the password stops the old one", async () => {
    const gwD = await provisionGateway(server, admin, { siteId: SITE, name: "Gateway D" });
    const rotated = await api(server, admin, `/api/gateways/${gwD.gateway.id}/rotate`, { method: "POST" });
    expect(rotated.status).toBe(200);
    expect(rotated.body.password).not.toBe(gwD.password);
    await expect(connectGateway(server, gwD)).rejects.toMatchObject({ code: 4 });
    const c = await connectGateway(server, { username: gwD.username, password: rotated.body.password });
    await endClient(c);
  });

  it("refuses a publish on another gateway's topic: connection closed, nothing stored, counted", async () => {
    const beforeA = await gatewayStatus(gwA);
    const beforeB = await gatewayStatus(gwB);
    // A's one connection (its client id is its gateway id) tries it, and connects again after.
    const c = clientA;
    const gone = closed(c);
    c.publish(topicOf(gwB), readingsMessage([{ point: "CH1-KW", value: 1, ts: iso(Date.now() - 1000) }]), { qos: 1 });
    await gone; // MQTT 3.1.1 §3.3.5: no negative PUBACK exists, the server closes the connection
    c.end(true);
    clientA = await connectGateway(server, gwA);
    const afterA = await waitFor(async () => {
      const s = await gatewayStatus(gwA);
      return (s.counters.rejected.foreign_topic ?? 0) > (beforeA.counters.rejected.foreign_topic ?? 0) && s;
    });
    expect((afterA.counters.rejected.foreign_topic ?? 0) - (beforeA.counters.rejected.foreign_topic ?? 0)).toBe(1);
    const afterB = await gatewayStatus(gwB);
    expect(afterB.counters.readingsAccepted).toBe(beforeB.counters.readingsAccepted);
    expect(afterB.counters.messages).toBe(beforeB.counters.messages);
  });

  it("grants a gateway only its own command topic (SUBACK 0x80 otherwise, §3.9.3)", async () => {
    // Read the SUBACK itself: mqtt.js turns any 0x80 into an error for the whole call.
    const suback = new Promise<number[]>((resolve) =>
      clientA.on("packetreceive", (p) => {
        if (p.cmd === "suback") resolve(p.granted as number[]);
      }),
    );
    clientA.subscribe(
      [topicOf(gwA, "commands"), topicOf(gwB, "commands"), "liftline/#", "$SYS/#"],
      { qos: 1 },
      () => {},
    );
    expect(await suback).toEqual([1, 128, 128, 128]);
    expect(clientA.connected).toBe(true);
  });

  it("keeps $SYS/ unwritable for gateways", async () => {
    const c = await connectGateway(server, gwB);
    const gone = closed(c);
    c.publish("$SYS/broker/fake", "x", { qos: 1 });
    await gone;
    c.end(true);
  });

  it("lets only an admin manage gateways: 403 for staff and customers on a visible site, 404 on an invisible one", async () => {
    const body = JSON.stringify({ siteId: SITE, name: "X", protocol: "json" });
    const post = (cookie: string) =>
      api(server, cookie, "/api/gateways", { method: "POST", headers: { "content-type": "application/json" }, body });
    const tech = await signIn(server.url, "luis@tallgrass.example");
    const own = await signIn(server.url, "facilities@harborview.example");
    const other = await signIn(server.url, "ops@quarryridge.example");
    expect((await post(tech.cookie!)).status).toBe(403);
    expect((await post(own.cookie!)).status).toBe(403);
    expect((await post(other.cookie!)).status).toBe(404);
    expect((await api(server, own.cookie!, `/api/gateways/${gwA.gateway.id}/rotate`, { method: "POST" })).status).toBe(
      403,
    );
    expect((await putPointMap(server, own.cookie!, gwA.gateway.id, POINT_MAP)).status).toBe(403);
    expect(
      (await api(server, other.cookie!, `/api/gateways/${gwA.gateway.id}/revoke`, { method: "POST" })).status,
    ).toBe(404);
    expect((await fetch(`${server.url}/api/gateways?site=${SITE}`)).status).toBe(401);
  });

  it("never returns a password hash", async () => {
    const list = await api(server, admin, `/api/gateways?site=${SITE}`);
    expect(list.status).toBe(200);
    expect(JSON.stringify(list.body)).not.toMatch(/\$2[aby]\$/);
    expect(JSON.stringify(list.body)).not.toMatch(/\$scrypt\$/);
    expect(JSON.stringify(list.body)).not.toMatch(/passwordHash|password_hash/);
  });
});

describe("bad-input corpus", () => {
  it("rejects every bad case with its counted reason, keeps the good readings, and stays up", async () => {
    const now = Date.now();
    const sentAt = iso(now);
    const good = (point: string, value: unknown, dt = 0) => ({ point, value, ts: iso(now - 3000 - dt) });
    const msg = (readings: unknown[]) => JSON.stringify({ seq: 1, sentAt, readings });
    type Case = {
      name: string;
      topic?: string;
      payload: string | Buffer;
      reasons: Record<string, number>;
      accepted?: number;
    };
    const cases: Case[] = [
      { name: "truncated JSON", payload: '{"seq":1,"sentAt":', reasons: { malformed_json: 1 } },
      {
        name: "NaN literal",
        payload: `{"sentAt":"${sentAt}","readings":[{"point":"CH1-LCHWT","value":NaN}]}`,
        reasons: { malformed_json: 1 },
      },
      {
        name: "Infinity literal",
        payload: `{"sentAt":"${sentAt}","readings":[{"point":"CH1-LCHWT","value":Infinity}]}`,
        reasons: { malformed_json: 1 },
      },
      { name: "empty payload", payload: "", reasons: { malformed_json: 1 } },
      { name: "binary garbage", payload: Buffer.from([0xff, 0xfe, 0x00, 0x81, 0x9c]), reasons: { malformed_json: 1 } },
      { name: "trailing garbage", payload: msg([]) + "}", reasons: { malformed_json: 1 } },
      { name: "JSON array", payload: "[]", reasons: { invalid_message: 1 } },
      { name: "JSON null", payload: "null", reasons: { invalid_message: 1 } },
      { name: "JSON string", payload: '"hello"', reasons: { invalid_message: 1 } },
      { name: "empty object", payload: "{}", reasons: { invalid_message: 1 } },
      {
        name: "readings not an array",
        payload: JSON.stringify({ sentAt, readings: {} }),
        reasons: { invalid_message: 1 },
      },
      {
        name: "sentAt missing",
        payload: JSON.stringify({ readings: [good("CH1-KW", 1)] }),
        reasons: { invalid_message: 1 },
      },
      {
        name: "sentAt not a time",
        payload: JSON.stringify({ sentAt: "yesterday", readings: [] }),
        reasons: { invalid_message: 1 },
      },
      {
        name: "seq negative",
        payload: JSON.stringify({ seq: -1, sentAt, readings: [] }),
        reasons: { invalid_message: 1 },
      },
      {
        name: "seq a string",
        payload: JSON.stringify({ seq: "7", sentAt, readings: [] }),
        reasons: { invalid_message: 1 },
      },
      {
        name: "more than 5000 readings",
        payload: msg(Array.from({ length: 5001 }, () => ({ point: "X", value: 1 }))),
        reasons: { invalid_message: 1 },
      },
      {
        name: "payload over 256 KB",
        payload: msg([{ point: "CH1-FAULT", value: "x".repeat(300 * 1024) }]),
        reasons: { too_large: 1 },
      },
      {
        name: "unknown channel of its own",
        topic: topicOf(gwA, "telemetry"),
        payload: msg([good("CH1-KW", 1)]),
        reasons: { bad_topic: 1 },
      },
      {
        name: "status not online/offline",
        topic: topicOf(gwA, "status"),
        payload: "maybe",
        reasons: { invalid_message: 1 },
      },
      {
        name: "value an object",
        payload: msg([{ point: "CH1-KW", value: { v: 1 } }]),
        reasons: { invalid_reading: 1 },
      },
      { name: "value null", payload: msg([{ point: "CH1-KW", value: null }]), reasons: { invalid_reading: 1 } },
      { name: "point missing", payload: msg([{ value: 1 }]), reasons: { invalid_reading: 1 } },
      { name: "point empty", payload: msg([{ point: "", value: 1 }]), reasons: { invalid_reading: 1 } },
      {
        name: "point name too long",
        payload: msg([{ point: "P".repeat(200), value: 1 }]),
        reasons: { invalid_reading: 1 },
      },
      { name: "unknown field", payload: msg([{ ...good("CH1-KW", 1), unit: "kW" }]), reasons: { invalid_reading: 1 } },
      {
        name: "ts not a time",
        payload: msg([{ point: "CH1-KW", value: 1, ts: "soon" }]),
        reasons: { invalid_reading: 1 },
      },
      {
        name: "quality unknown",
        payload: msg([{ ...good("CH1-KW", 1), quality: "excellent" }]),
        reasons: { invalid_reading: 1 },
      },
      {
        name: "text value too long",
        payload: msg([good("CH1-FAULT", "f".repeat(201))]),
        reasons: { invalid_reading: 1 },
      },
      { name: "reading not an object", payload: msg([42]), reasons: { invalid_reading: 1 } },
      { name: "text for a temperature", payload: msg([good("CH1-LCHWT", "44.3")]), reasons: { wrong_type: 1 } },
      { name: "boolean for a temperature", payload: msg([good("CH1-LCHWT", true)]), reasons: { wrong_type: 1 } },
      { name: "2 for a run status", payload: msg([good("CH1-RUN", 2)]), reasons: { wrong_type: 1 } },
      { name: "unknown drive mode", payload: msg([good("CT1-MODE", "turbo")]), reasons: { wrong_type: 1 } },
      { name: "number for a fault text", payload: msg([good("CH1-FAULT", 17)]), reasons: { wrong_type: 1 } },
      { name: "overflows when converted", payload: msg([good("CH1-EVAP", 1.7e308)]), reasons: { wrong_type: 1 } },
      // Finite but absurd (lib/quantities.ts plausibleRanges): counted, not stored.
      { name: "1e308 kW", payload: msg([good("CH1-KW", 1e308)]), reasons: { out_of_range: 1 } },
      { name: "-1e308 °F", payload: msg([good("CH1-LCHWT", -1e308)]), reasons: { out_of_range: 1 } },
      {
        name: "10 minutes in the future",
        payload: msg([{ point: "CH1-KW", value: 1, ts: iso(now + 10 * 60_000) }]),
        reasons: { future_timestamp: 1 },
      },
      {
        name: "older than raw retention",
        payload: msg([{ point: "CH1-KW", value: 1, ts: iso(now - 30 * 86_400_000) }]),
        reasons: { too_old: 1 },
      },
      { name: "unknown point", payload: msg([good("CH9-MYSTERY", 1)]), reasons: { unmapped_point: 1 } },
      {
        name: "mixed: good readings kept beside bad ones",
        payload: msg([
          good("CH1-KW", 250, 0),
          { point: "CH1-KW", value: "high" },
          good("CH1-RUN", true, 10),
          good("CH9-MYSTERY", 2, 20),
          good("CT1-MODE", "Auto", 30),
          { point: "CH1-KW", value: 1, ts: iso(now + 3_600_000) },
          good("CH1-FAULT", "Low evaporator pressure", 40),
        ]),
        reasons: { wrong_type: 1, unmapped_point: 1, future_timestamp: 1 },
        accepted: 4,
      },
    ];
    expect(cases.length).toBeGreaterThanOrEqual(30);

    const before = await gatewayStatus(gwA);
    for (const c of cases) await publishQos1(clientA, c.topic ?? topicOf(gwA), c.payload);
    expect(clientA.connected, "the gateway's connection survives bad input").toBe(true);
    const after = await gatewayStatus(gwA);

    const expected: Record<string, number> = {};
    for (const c of cases) for (const [r, n] of Object.entries(c.reasons)) expected[r] = (expected[r] ?? 0) + n;
    const delta: Record<string, number> = {};
    for (const r of new Set([...Object.keys(after.counters.rejected), ...Object.keys(expected)])) {
      const d = (after.counters.rejected[r] ?? 0) - (before.counters.rejected[r] ?? 0);
      if (d) delta[r] = d;
    }
    expect(delta).toEqual(expected);
    expect(after.counters.messages - before.counters.messages).toBe(cases.length);
    expect(after.counters.readingsAccepted - before.counters.readingsAccepted).toBe(4);
    expect(after.unmapped.find((u) => u.point === "CH9-MYSTERY")?.count).toBe(2);

    // The good readings of the mixed message are there, converted and typed.
    const latest = (await api(server, admin, `/api/sites/${SITE}/latest`)).body.latest;
    const byKey = (tag: string, key: string) =>
      latest.points.find((p: { equipmentTag: string; key: string }) => p.equipmentTag === tag && p.key === key);
    expect(byKey("CH-1", "run_status").value).toBe(true);
    expect(byKey("CT-1", "fan_drive_mode").value).toBe("auto");
    expect(byKey("CH-1", "fault_text").value).toBe("Low evaporator pressure");

    const health = await fetch(`${server.url}/api/health`);
    expect(health.status).toBe(200);
    expect(server.process.exitCode).toBeNull();
  });
});
