import { spawn, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import mqtt, { type MqttClient } from "mqtt";
import { afterAll, describe, expect, it } from "vitest";
import { freePort, startServer, type TestServer } from "../helpers/server";
import { adminCookie, api, provisionGateway, putPointMap, readingsMessage, waitFor } from "../helpers/mqtt";

// External broker mode against a real Mosquitto (Debian's /usr/sbin/mosquitto, installed by
// .ci/run): Liftline keeps a persistent QoS 1 session, so readings published while it is
// stopped arrive once it starts again.

const MOSQUITTO = "/usr/sbin/mosquitto";
const hasMosquitto = fs.existsSync(MOSQUITTO);
if (!hasMosquitto)
  console.warn(`\n*** SKIPPING external broker tests: ${MOSQUITTO} not found (apt-get install mosquitto) ***\n`);

const SITE = "millbrook-high";
let broker: ChildProcess | undefined;
let server: TestServer | undefined;
let publisher: MqttClient | undefined;

afterAll(async () => {
  publisher?.end(true);
  await server?.stop();
  broker?.kill("SIGTERM");
});

describe.skipIf(!hasMosquitto)("external broker mode (Mosquitto)", () => {
  it("stores readings through Mosquitto, including those published while Liftline was down", async () => {
    const port = await freePort();
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "liftline-mosquitto-"));
    fs.writeFileSync(
      path.join(dir, "mosquitto.conf"),
      [`listener ${port} 127.0.0.1`, "allow_anonymous true", "persistence false", "max_queued_messages 10000", ""].join(
        "\n",
      ),
    );
    broker = spawn(MOSQUITTO, ["-c", path.join(dir, "mosquitto.conf")], { stdio: ["ignore", "pipe", "pipe"] });
    let brokerOut = "";
    broker.stderr!.on("data", (d) => (brokerOut += d));
    const url = `mqtt://127.0.0.1:${port}`;
    publisher = await waitFor(
      () =>
        new Promise<MqttClient | undefined>((resolve) => {
          const c = mqtt.connect(url, { protocolVersion: 4, reconnectPeriod: 0, clientId: "site-gateway" });
          c.once("connect", () => resolve(c));
          c.once("error", () => resolve(undefined));
        }),
      10_000,
      200,
    ).catch((err) => {
      throw new Error(`mosquitto did not start: ${err}\n${brokerOut}`);
    });

    server = await startServer({ env: { MQTT_URL: url } });
    expect(server.output()).toMatch(/MQTT broker mqtt:\/\/127\.0\.0\.1/);
    const health = await (await fetch(`${server.url}/api/health`)).json();
    expect(health.broker).toEqual({ mode: "external", up: true });

    const admin = await adminCookie(server);
    const gw = await provisionGateway(server, admin, { siteId: SITE, name: "Via Mosquitto" });
    expect(
      (
        await putPointMap(
          server,
          admin,
          gw.gateway.id,
          "gateway_point,equipment,quantity,unit\nKW,CH-2,compressor_power,kW\n",
        )
      ).status,
    ).toBe(200);
    const site = await api(server, admin, `/api/sites/${SITE}`);
    const pointId = site.body.site.equipment
      .find((e: { tag: string }) => e.tag === "CH-2")
      .points.find((p: { key: string }) => p.key === "compressor_power").id;
    const topic = `liftline/${gw.gateway.id}/readings`;
    const series = async () =>
      (
        await api(
          server!,
          admin,
          `/api/points/${pointId}/series?from=${Date.now() - 3_600_000}&to=${Date.now() + 60_000}`,
        )
      ).body.series as { time: number[]; avg: number[] };

    const t1 = Date.now() - 5000;
    await publisher.publishAsync(
      topic,
      readingsMessage([{ point: "KW", value: 111, ts: new Date(t1).toISOString() }]),
      { qos: 1 },
    );
    await waitFor(async () => (await series())?.time.includes(t1), 30_000).catch((err) => {
      throw new Error(`${err}\n${server!.output().slice(-3000)}`);
    });

    // A topic of no gateway is dropped without harm.
    await publisher.publishAsync("liftline/gw-doesnotexist/readings", readingsMessage([{ point: "KW", value: 1 }]), {
      qos: 1,
    });

    const dataDir = server.dataDir;
    await server.stop();
    const t2 = Date.now() - 4000;
    const t3 = Date.now() - 3000;
    await publisher.publishAsync(
      topic,
      readingsMessage([{ point: "KW", value: 222, ts: new Date(t2).toISOString() }]),
      { qos: 1 },
    );
    await publisher.publishAsync(
      topic,
      readingsMessage([{ point: "KW", value: 333, ts: new Date(t3).toISOString() }]),
      { qos: 1 },
    );

    server = await startServer({ dataDir, env: { MQTT_URL: url } });
    const s = await waitFor(async () => {
      const r = await series();
      return r.time.includes(t3) && r;
    }, 30_000);
    expect(s.time).toEqual([t1, t2, t3]);
    expect(s.avg).toEqual([111, 222, 333]);
    expect(server.output()).toMatch(/session resumed/);
  }, 300_000);
});
