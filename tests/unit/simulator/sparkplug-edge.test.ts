import net from "node:net";
import { Aedes } from "aedes";
import mqtt from "mqtt";
import sparkplugPayload from "sparkplug-payload";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startSimulatedGateway } from "@/simulator/gateway-client";
import { pointMapRows, siteLayouts } from "@/simulator";
import { PlantRunner, type RunSample } from "@/simulator/run";
import { nextSeq, SparkplugEdgeNode, sparkplugPointMapCsv, type SparkplugPublish } from "@/simulator/sparkplug-edge";

// The simulator as a Sparkplug B 3.0 edge node: seq/bdSeq arithmetic, birth and data contents, commands,
// and a run over a real (in-process) broker. Facts: REFERENCES.md §8 (Eclipse Sparkplug 3.0).
const codec = sparkplugPayload.get("spBv1.0")!;
type Decoded = ReturnType<typeof codec.decodePayload>;
const layout = siteLayouts["medical-office"];
const num = (v: unknown) => (typeof v === "number" ? v : (v as { toNumber(): number }).toNumber());

function samples(n: number): RunSample[] {
  const runner = new PlantRunner({
    scenario: "design-steady",
    seed: 3,
    startMs: Date.parse("2026-06-01T10:00:00Z"),
    layout,
  });
  const out: RunSample[] = [];
  runner.advanceTo(10 * (n - 1), (s) => out.push(s));
  return out;
}

function node(bdSeq?: number) {
  const sent: Array<SparkplugPublish & { decoded: Decoded; type: string; device?: string }> = [];
  const edge = new SparkplugEdgeNode({
    groupId: "harborview",
    edgeNodeId: "plant-1",
    layout,
    now: () => Date.parse("2026-06-01T12:00:00Z"),
    bdSeq,
    publish: (m) => {
      const parts = m.topic.split("/");
      sent.push({ ...m, decoded: codec.decodePayload(new Uint8Array(m.payload)), type: parts[2], device: parts[4] });
    },
  });
  return { edge, sent };
}

const cmd = (
  metrics: Array<{
    name?: string;
    alias?: number;
    type: "Boolean" | "String" | "Double" | "Int32";
    value: boolean | string | number;
  }>,
) => Buffer.from(codec.encodePayload({ timestamp: Date.now(), metrics }));

describe("Sparkplug edge node (protocol logic)", () => {
  const data = samples(40);

  it("seq wraps 255 → 0 and bdSeq wraps 255 → 0 (REFERENCES.md §8)", () => {
    expect(nextSeq(254)).toBe(255);
    expect(nextSeq(255)).toBe(0);
    const { edge, sent } = node();
    edge.publishSamples([data[0]]);
    for (const s of data.slice(1)) edge.publishSamples([s]);
    // 1 NBIRTH + 8 DBIRTHs, then 8 DDATA per sample: more than 256 messages.
    expect(sent.length).toBe(1 + 8 + 39 * 8);
    const seqs = sent.map((m) => num(m.decoded.seq));
    expect(seqs[0]).toBe(0);
    for (let i = 1; i < seqs.length; i++) expect(seqs[i]).toBe((seqs[i - 1] + 1) % 256);
    expect(seqs[255]).toBe(255);
    expect(seqs[256]).toBe(0);

    const b = node(255).edge;
    expect(b.bdSeq).toBe(255);
    b.reconnecting();
    expect(b.bdSeq).toBe(0);
    expect(b.birthPending).toBe(true);
  });

  it("NBIRTH carries bdSeq and Node Control/Rebirth; each DBIRTH declares every metric with alias, datatype and value; DDATA goes by alias", () => {
    const { edge, sent } = node(7);
    edge.publishSamples(data.slice(0, 3));
    const nbirth = sent[0];
    expect(nbirth.topic).toBe("spBv1.0/harborview/NBIRTH/plant-1");
    expect(nbirth.qos).toBe(0);
    expect(nbirth.decoded.metrics).toEqual([
      expect.objectContaining({ name: "bdSeq", type: "Int64" }),
      expect.objectContaining({ name: "Node Control/Rebirth", type: "Boolean", value: false }),
    ]);
    expect(num(nbirth.decoded.metrics![0].value)).toBe(7);

    const births = sent.filter((m) => m.type === "DBIRTH");
    expect(births.map((m) => m.device)).toEqual(["CH-1", "CT-1", "CHWP-1", "CWP-1", "AHU-1", "AHU-2", "AHU-3", "WS-1"]);
    const declared = births.flatMap((m) =>
      m.decoded.metrics!.map((x) => ({
        key: `${m.device}/${x.name}`,
        alias: num(x.alias),
        type: x.type,
        value: x.value,
      })),
    );
    // Every point of the point map, each with its own alias (unique across the node).
    expect(declared.map((d) => d.key).sort()).toEqual(
      pointMapRows(layout)
        .map((r) => `${r.equipment}/${r.gateway_point}`)
        .sort(),
    );
    expect(new Set(declared.map((d) => d.alias)).size).toBe(declared.length);
    const byKey = new Map(declared.map((d) => [d.key, d]));
    expect(byKey.get("CH-1/CH1-LCHWT")).toMatchObject({ type: "Double" });
    expect(byKey.get("CH-1/CH1-LCHWT")!.value).toBeCloseTo(44, 0);
    expect(byKey.get("CH-1/CH1-RUN")).toMatchObject({ type: "Boolean", value: true });
    expect(byKey.get("CT-1/CT1-FAN-MODE")).toMatchObject({ type: "String", value: "auto" });

    // The birth took the first sample; the other two go out as DDATA, one per device, by alias only.
    const ddata = sent.filter((m) => m.type === "DDATA");
    expect(ddata).toHaveLength(8);
    const ch1 = ddata.find((m) => m.device === "CH-1")!;
    expect(
      ch1.decoded.metrics!.every(
        (x) =>
          x.name === undefined &&
          byKey.get(`CH-1/${declared.find((d) => d.alias === num(x.alias))!.key.split("/")[1]}`),
      ),
    ).toBe(true);
    expect(ch1.decoded.metrics).toHaveLength(2 * edge.catalog.devices[0].metrics.length);
    expect(new Set(ch1.decoded.metrics!.map((x) => num(x.timestamp)))).toEqual(new Set([data[1].tsMs, data[2].tsMs]));
  });

  it("an NCMD Node Control/Rebirth re-sends NBIRTH (seq 0, same bdSeq) and every DBIRTH with the last values", () => {
    const { edge, sent } = node(3);
    edge.publishSamples(data.slice(0, 5));
    const before = sent.length;
    expect(
      edge.handleCommand(
        "spBv1.0/harborview/NCMD/plant-1",
        cmd([{ name: "Node Control/Rebirth", type: "Boolean", value: true }]),
      ),
    ).toEqual([{ kind: "rebirth" }]);
    edge.publishSamples([]);
    const again = sent.slice(before);
    expect(again.map((m) => m.type)).toEqual(["NBIRTH", ...Array(8).fill("DBIRTH")]);
    expect(num(again[0].decoded.seq)).toBe(0);
    expect(num(again[0].decoded.metrics![0].value)).toBe(3);
    const lchwt = again.find((m) => m.device === "CH-1")!.decoded.metrics!.find((x) => x.name === "CH1-LCHWT")!;
    expect(num(lchwt.timestamp)).toBe(data[4].tsMs);
    expect(
      edge.handleCommand(
        "spBv1.0/harborview/NCMD/plant-1",
        cmd([{ name: "Node Control/Reboot", type: "Boolean", value: true }]),
      )[0],
    ).toMatchObject({ kind: "refused" });
  });

  it("the NDEATH will: bdSeq as Int64, no seq, QoS 1, not retained", () => {
    const { edge } = node(9);
    const will = edge.will();
    expect(will).toMatchObject({ topic: "spBv1.0/harborview/NDEATH/plant-1", qos: 1, retain: false });
    const d = codec.decodePayload(new Uint8Array(will.payload));
    expect(d.seq == null || num(d.seq) === 0).toBe(true);
    expect(d.metrics).toEqual([expect.objectContaining({ name: "bdSeq", type: "Int64" })]);
    expect(num(d.metrics![0].value)).toBe(9);
    expect(edge.commandTopics).toEqual(["spBv1.0/harborview/NCMD/plant-1", "spBv1.0/harborview/DCMD/plant-1/+"]);
  });

  it("DCMD writes to the drill points become drill actions (by name or alias); others are refused with a reason", () => {
    const { edge } = node();
    const alias = edge.catalog.byKey.get("CH-1/CH1-SPS-TMR")!.alias;
    expect(
      edge.handleCommand(
        "spBv1.0/harborview/DCMD/plant-1/CT-1",
        cmd([
          { name: "CT1-FAN-MODE", type: "String", value: "hand" },
          { name: "CT1-FAN-HZ", type: "Double", value: 60 },
        ]),
      ),
    ).toEqual([
      {
        kind: "action",
        device: "CT-1",
        action: { type: "set-fan-drive-mode", equipment: "CT-1", mode: "hand", handHz: 60 },
      },
    ]);
    expect(
      edge.handleCommand("spBv1.0/harborview/DCMD/plant-1/CH-1", cmd([{ alias, type: "Int32", value: 120 }])),
    ).toEqual([
      {
        kind: "action",
        device: "CH-1",
        action: { type: "set-anti-recycle-timer", equipment: "CH-1", timer: "stop-to-start", seconds: 120 },
      },
    ]);
    expect(
      edge
        .handleCommand(
          "spBv1.0/harborview/DCMD/plant-1/CH-1",
          cmd([
            { name: "CH1-ALARM", type: "Boolean", value: false },
            { name: "CH1-ENABLE", type: "Boolean", value: true },
          ]),
        )
        .map((o) => o.kind === "action" && o.action.type),
    ).toEqual(["reset-alarm", "set-chiller-enable"]);
    expect(
      edge.handleCommand(
        "spBv1.0/harborview/DCMD/plant-1/AHU-2",
        cmd([{ name: "AHU2-RUN", type: "Boolean", value: false }]),
      ),
    ).toEqual([
      { kind: "action", device: "AHU-2", action: { type: "set-air-handler", equipment: "AHU-2", run: false } },
    ]);

    const refused = (device: string, metrics: Parameters<typeof cmd>[0]) =>
      edge
        .handleCommand(`spBv1.0/harborview/DCMD/plant-1/${device}`, cmd(metrics))
        .map((o) => (o.kind === "refused" ? o.message : o.kind));
    expect(refused("CH-1", [{ name: "CH1-LCHWT", type: "Double", value: 40 }])).toEqual([
      expect.stringMatching(/read-only/),
    ]);
    expect(refused("CT-1", [{ name: "CT1-FAN-MODE", type: "String", value: "turbo" }])).toEqual([
      expect.stringMatching(/^Command refused: mode/),
    ]);
    expect(refused("CT-1", [{ name: "CH1-RUN", type: "Boolean", value: true }])).toEqual([
      expect.stringMatching(/CT-1 has no metric CH1-RUN/),
    ]);
    expect(refused("CH-9", [{ name: "CH9-RUN", type: "Boolean", value: true }])).toEqual([
      expect.stringMatching(/unknown device/),
    ]);
    expect(
      edge.handleCommand("spBv1.0/harborview/DCMD/plant-1/CH-1", Buffer.from([0xff, 0xff, 0xff]))[0],
    ).toMatchObject({ kind: "refused" });
    expect(edge.handleCommand("spBv1.0/other/DCMD/plant-1/CH-1", cmd([]))).toEqual([{ kind: "ignored" }]);
  });

  it("rejects ids a topic level cannot carry, and the point map names device metrics as {device}/{metric}", () => {
    expect(
      () => new SparkplugEdgeNode({ groupId: "a/b", edgeNodeId: "n", layout, now: Date.now, publish: () => {} }),
    ).toThrow();
    expect(
      () => new SparkplugEdgeNode({ groupId: "g", edgeNodeId: "n+", layout, now: Date.now, publish: () => {} }),
    ).toThrow();
    const csv = sparkplugPointMapCsv(layout).trim().split("\n");
    expect(csv[0]).toBe("gateway_point,equipment,quantity,unit");
    expect(csv).toContain("CH-1/CH1-LCHWT,CH-1,chilled_water_leaving_temp,degF");
    expect(csv).toHaveLength(pointMapRows(layout).length + 1);
  });
});

describe("simulated gateway as a Sparkplug edge node over MQTT", () => {
  let broker: Awaited<ReturnType<typeof Aedes.createBroker>>;
  let server: net.Server;
  let url = "";
  beforeAll(async () => {
    broker = await Aedes.createBroker();
    server = net.createServer(broker.handle);
    await new Promise<void>((r) => server.listen(0, "127.0.0.1", () => r()));
    url = `mqtt://127.0.0.1:${(server.address() as net.AddressInfo).port}`;
  });
  afterAll(async () => {
    await new Promise<void>((r) => server.close(() => r()));
    await new Promise<void>((r) => broker.close(() => r()));
  });

  it("births, DDATA by alias, honours a rebirth request, applies a DCMD drill and ends with its NDEATH", async () => {
    const sub = await mqtt.connectAsync(url, { clientId: "sp-test-sub" });
    const got: Array<{ type: string; device?: string; d: Decoded }> = [];
    sub.on("message", (topic, payload) => {
      const parts = topic.split("/");
      got.push({ type: parts[2], device: parts[4], d: codec.decodePayload(new Uint8Array(payload)) });
    });
    await sub.subscribeAsync("spBv1.0/#", { qos: 1 });
    const events: string[] = [];
    const until = async (f: () => boolean) => {
      const deadline = Date.now() + 15_000;
      while (!f() && Date.now() < deadline) await new Promise((r) => setTimeout(r, 50));
      expect(f()).toBe(true);
    };
    const gw = startSimulatedGateway({
      mqttUrl: url,
      username: "gw-sp",
      password: "x",
      protocol: "sparkplug",
      groupId: "harborview",
      edgeNodeId: "plant-1",
      scenario: "design-steady",
      speed: 600,
      seed: 7,
      siteLayout: "medical-office",
      onEvent: (e) => events.push(`${e.kind}: ${e.message}`),
    });
    try {
      await until(() => got.filter((m) => m.type === "DDATA").length >= 16);
      expect(got[0].type).toBe("NBIRTH");
      expect(got.slice(1, 9).map((m) => m.type)).toEqual(Array(8).fill("DBIRTH"));
      const seqs = got.map((m) => num(m.d.seq));
      for (let i = 1; i < seqs.length; i++) expect(seqs[i]).toBe((seqs[i - 1] + 1) % 256);

      const n = got.length;
      await sub.publishAsync(
        "spBv1.0/harborview/NCMD/plant-1",
        cmd([{ name: "Node Control/Rebirth", type: "Boolean", value: true }]),
        { qos: 0 },
      );
      await until(() => got.slice(n).some((m) => m.type === "NBIRTH"));
      const reborn = got.slice(n).find((m) => m.type === "NBIRTH")!;
      expect(num(reborn.d.seq)).toBe(0);
      expect(num(reborn.d.metrics!.find((x) => x.name === "bdSeq")!.value)).toBe(0);

      await sub.publishAsync(
        "spBv1.0/harborview/DCMD/plant-1/CH-1",
        cmd([{ name: "CH1-SPS-TMR", type: "Double", value: 30 }]),
        { qos: 0 },
      );
      await sub.publishAsync(
        "spBv1.0/harborview/DCMD/plant-1/AHU-3",
        cmd([{ name: "AHU3-RUN", type: "Boolean", value: false }]),
        { qos: 0 },
      );
      await until(
        () =>
          events.some((e) => /outside the controller limits 60–1800 s/.test(e)) &&
          events.some((e) => /^action: .*stop air handler/.test(e)),
      );
      expect(gw.status()).toMatchObject({ protocol: "sparkplug", connected: true });

      await gw.stop();
      await until(() => got.some((m) => m.type === "NDEATH"));
      expect(num(got.find((m) => m.type === "NDEATH")!.d.metrics![0].value)).toBe(0);
    } finally {
      await gw.stop();
      sub.end(true);
    }
  }, 30_000);
});
