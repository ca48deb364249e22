import { execFileSync, spawn, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import mqtt, { type IClientOptions, type MqttClient } from "mqtt";
import { afterAll, describe, expect, it } from "vitest";
import { freePort, ROOT, startServer, type TestServer } from "../helpers/server";
import {
  adminCookie,
  api,
  provisionGateway,
  putPointMap,
  readingsMessage,
  waitFor,
  type ProvisionedGateway,
} from "../helpers/mqtt";

// External broker mode against a real Mosquitto (Debian's /usr/sbin/mosquitto, installed by
// .ci/run) running the configuration and ACL shipped in gateway/mosquitto/: Liftline keeps a
// persistent QoS 1 session, so readings published while it is stopped arrive once it starts
// again; a gateway can neither take over another's session nor publish on its topics.

const MOSQUITTO = "/usr/sbin/mosquitto";
const MOSQUITTO_PASSWD = "/usr/bin/mosquitto_passwd";
const SHIPPED = path.join(ROOT, "gateway", "mosquitto");
const hasMosquitto = fs.existsSync(MOSQUITTO) && fs.existsSync(MOSQUITTO_PASSWD);
if (!hasMosquitto)
  console.warn(`\n*** SKIPPING external broker tests: ${MOSQUITTO} not found (apt-get install mosquitto) ***\n`);

const SITE = "millbrook-high";
const INGEST = { username: "liftline-ingest", password: "test-ingest-password" };
let broker: ChildProcess | undefined;
let brokerOut = "";
let server: TestServer | undefined;
let publisher: MqttClient | undefined;
let admin = "";
let url = "";
let passwordFile = "";
const clients: MqttClient[] = [];

afterAll(async () => {
  publisher?.end(true);
  for (const c of clients) c.end(true);
  await server?.stop();
  broker?.kill("SIGTERM");
});

/** gateway/mosquitto/liftline.conf with this test's listener, password file and directories. */
function writeConfig(dir: string, port: number): string {
  let conf = fs.readFileSync(path.join(SHIPPED, "liftline.conf"), "utf8");
  const swaps: Array<[RegExp | string, string]> = [
    [/^listener 1883$/m, `listener ${port} 127.0.0.1`],
    ["/etc/mosquitto/liftline.passwd", passwordFile],
    ["/etc/mosquitto/liftline.acl", path.join(SHIPPED, "liftline.acl")],
    ["/var/lib/mosquitto/", `${dir}/`],
  ];
  for (const [from, to] of swaps) {
    const next = conf.replace(from, to);
    if (next === conf) throw new Error(`gateway/mosquitto/liftline.conf has no ${String(from)}`);
    conf = next;
  }
  const file = path.join(dir, "mosquitto.conf");
  fs.writeFileSync(file, conf);
  return file;
}

/** Connects as the given user; undefined when refused or closed. */
function tryConnect(creds: { username: string; password: string }, extra: IClientOptions = {}) {
  return new Promise<MqttClient | undefined>((resolve) => {
    const c = mqtt.connect(url, {
      protocolVersion: 4,
      reconnectPeriod: 0,
      clientId: creds.username,
      username: creds.username,
      password: creds.password,
      ...extra,
    });
    c.once("connect", () => resolve(c));
    c.once("error", () => resolve(undefined));
    c.once("close", () => resolve(undefined));
  });
}

/** As provisioning would: the gateways' credentials into the password file, then a reload (SIGHUP). */
async function allow(...gws: ProvisionedGateway[]) {
  for (const gw of gws) execFileSync(MOSQUITTO_PASSWD, ["-b", passwordFile, gw.username, gw.password]);
  fs.chmodSync(passwordFile, 0o644);
  broker!.kill("SIGHUP");
  const last = gws[gws.length - 1];
  (await waitFor(() => tryConnect(last), 10_000, 200)).end(true);
}

async function connectAs(gw: ProvisionedGateway, extra: IClientOptions = {}): Promise<MqttClient> {
  const c = await tryConnect(gw, extra);
  if (!c) throw new Error(`${gw.username} could not connect`);
  clients.push(c);
  return c;
}

async function messagesOf(gw: ProvisionedGateway): Promise<number> {
  return (await api(server!, admin, `/api/gateways/${gw.gateway.id}`)).body.gateway.counters.messages;
}

describe.skipIf(!hasMosquitto)("external broker mode (Mosquitto)", () => {
  it("stores readings through Mosquitto, including those published while Liftline was down", async () => {
    const port = await freePort();
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "liftline-mosquitto-"));
    // Started as root, Mosquitto runs as its own user (its `user` option), which must read the
    // password file and write its persistence here.
    fs.chmodSync(dir, 0o777);
    passwordFile = path.join(dir, "liftline.passwd");
    execFileSync(MOSQUITTO_PASSWD, ["-c", "-b", passwordFile, INGEST.username, INGEST.password]);
    fs.chmodSync(passwordFile, 0o644);
    broker = spawn(MOSQUITTO, ["-c", writeConfig(dir, port)], { stdio: ["ignore", "pipe", "pipe"] });
    broker.stderr!.on("data", (d) => (brokerOut += d));
    url = `mqtt://127.0.0.1:${port}`;
    // Up once the ingest user can connect (before Liftline does, so this probe takes no session of its).
    (
      await waitFor(() => tryConnect(INGEST), 10_000, 200).catch((err) => {
        throw new Error(`mosquitto did not start: ${err}\n${brokerOut}`);
      })
    ).end(true);
    const env = { MQTT_URL: url, MQTT_USERNAME: INGEST.username, MQTT_PASSWORD: INGEST.password };

    server = await startServer({ env });
    expect(server.output()).toMatch(/MQTT broker mqtt:\/\/127\.0\.0\.1/);
    const health = await (await fetch(`${server.url}/api/health`)).json();
    expect(health.broker).toEqual({ mode: "external", up: true });

    admin = await adminCookie(server);
    const gw = await provisionGateway(server, admin, { siteId: SITE, name: "Via Mosquitto" });
    await allow(gw);
    publisher = await connectAs(gw);
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

    server = await startServer({ dataDir, env });
    const s = await waitFor(async () => {
      const r = await series();
      return r.time.includes(t3) && r;
    }, 30_000);
    expect(s.time).toEqual([t1, t2, t3]);
    expect(s.avg).toEqual([111, 222, 333]);
    expect(server.output()).toMatch(/session resumed/);
  }, 300_000);

  it("keeps each gateway to its own session and topics (gateway/mosquitto/liftline.acl)", async () => {
    const a = await provisionGateway(server!, admin, { siteId: SITE, name: "Gateway A" });
    const b = await provisionGateway(server!, admin, { siteId: "harborview-mob", name: "Gateway B" });
    await allow(a, b);
    const clientA = await connectAs(a);
    let aClosed = false;
    clientA.on("close", () => (aClosed = true));

    // B claims A's client id; use_username_as_clientid names B's session after B's user name.
    const clientB = await connectAs(b, { clientId: a.username });
    await new Promise((r) => setTimeout(r, 500));
    expect(aClosed).toBe(false);

    const beforeA = await messagesOf(a);
    const beforeB = await messagesOf(b);
    // Denied by the ACL: not delivered to Liftline (a 3.1.1 publisher still gets its PUBACK).
    await clientB.publishAsync(`liftline/${a.gateway.id}/readings`, readingsMessage([{ point: "KW", value: 9 }]), {
      qos: 1,
    });
    // B's own topic, sent after it on the same connection, arrives: the denied one would have come first.
    await clientB.publishAsync(`liftline/${b.gateway.id}/readings`, readingsMessage([{ point: "KW", value: 1 }]), {
      qos: 1,
    });
    await waitFor(async () => (await messagesOf(b)) > beforeB, 30_000);
    expect(await messagesOf(a)).toBe(beforeA);

    // A's session is still A's.
    await clientA.publishAsync(`liftline/${a.gateway.id}/readings`, readingsMessage([{ point: "KW", value: 2 }]), {
      qos: 1,
    });
    await waitFor(async () => (await messagesOf(a)) > beforeA, 30_000);
    expect(aClosed).toBe(false);
  }, 120_000);
});
