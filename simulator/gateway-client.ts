// Publishing a simulated plant as a site gateway over MQTT, with the Liftline JSON contract:
//   liftline/{gatewayId}/readings  QoS 1  { seq, sentAt, readings: [{ point, value, ts, quality }] }
//   liftline/{gatewayId}/status    retained "online", last will retained "offline"
//   liftline/{gatewayId}/commands  drill commands (JSON, validated with zod) applied to the model
// With `protocol: "sparkplug"` it is a Sparkplug B 3.0 edge node instead (sparkplug-edge.ts): births, DDATA by
// alias, NCMD rebirth, DCMD writes as drill actions; no liftline/… topics then.
// Exported as a function so the server process can run simulated gateways in-process.
import mqtt, { type MqttClient } from "mqtt";
import { jsonTopics } from "@/gateway/contract";
import type { SimulatedRunDto } from "@/lib/dto/simulator";
import { actionOfCommand, drillCommandSchema, type DrillAction } from "./actions-schema";
import { defaultLayout, equipmentOf, getLayout, type SiteLayout } from "./layout";
import { pointName, wireValue } from "./points";
import { PlantRunner, type RunSample, type SimEvent } from "./run";
import { getScenario, type Scenario } from "./scenarios";
import { SparkplugEdgeNode } from "./sparkplug-edge";
import type { EquipmentKind } from "@/lib/quantities";

export interface SimulatedGatewayOptions {
  mqttUrl: string;
  username: string;
  password: string;
  /** Defaults to the MQTT username. */
  gatewayId?: string;
  /** Wire format: the Liftline JSON contract (default) or Sparkplug B 3.0. */
  protocol?: "json" | "sparkplug";
  /** Sparkplug only (required there): the node's group id and edge node id, as provisioned. */
  groupId?: string;
  edgeNodeId?: string;
  scenario: string | Scenario;
  /** Simulated seconds per wall second. */
  speed: number;
  seed: number;
  /** A layout object or a demo site name (`medical-office`, `data-hall`, `school`, `default`). */
  siteLayout?: SiteLayout | string;
  durationS?: number;
  stepS?: number;
  sampleEveryS?: number;
  /** Replay the scenario again when it ends. Later passes continue from the previous end, held to real time. */
  loop?: boolean;
  /** Event time of scenario second 0; default: so the first pass reaches "now" exactly at its end. */
  startMs?: number;
  log?: (line: string) => void;
  /** Called with each scenario event, fault-log entry and drill outcome. */
  onEvent?: (e: SimEvent) => void;
  /** Called with each sample as it is published (a drill follows the plant through it). */
  onSample?: (s: RunSample) => void;
  /** Wall clock, injectable for tests. */
  now?: () => number;
}

/** A simulated gateway's run as the admin's simulator page shows it (without the manager's additions). */
export type SimulatedGatewayStatus = Omit<SimulatedRunDto, "speed" | "startedAt" | "recentEvents"> & {
  recentEvents: SimEvent[];
};

export interface SimulatedGateway {
  stop(): Promise<void>;
  status(): SimulatedGatewayStatus;
}

const tickMs = 250;
const maxReadingsPerMessage = 2000;

export function startSimulatedGateway(opts: SimulatedGatewayOptions): SimulatedGateway {
  const log = opts.log ?? (() => {});
  const now = opts.now ?? Date.now;
  const gatewayId = opts.gatewayId ?? opts.username;
  const layout = typeof opts.siteLayout === "string" ? getLayout(opts.siteLayout) : (opts.siteLayout ?? defaultLayout);
  if (!layout) throw new Error(`unknown site layout "${String(opts.siteLayout)}"`);
  const scenario = typeof opts.scenario === "string" ? getScenario(opts.scenario) : opts.scenario;
  const durationS = opts.durationS ?? scenario.defaultDurationS;
  if (!(opts.speed > 0)) throw new Error("speed must be > 0");
  const topics = {
    readings: jsonTopics.readings(gatewayId),
    status: jsonTopics.status(gatewayId),
    commands: jsonTopics.commands(gatewayId),
  };
  const kinds = new Map<string, EquipmentKind>(equipmentOf(layout).map((e) => [e.tag, e.kind]));
  const protocol = opts.protocol ?? "json";
  if (protocol === "sparkplug" && (!opts.groupId || !opts.edgeNodeId))
    throw new Error("Sparkplug needs groupId and edgeNodeId");
  // Sparkplug: the node's ids are checked with zod by SparkplugEdgeNode; it publishes through this client.
  const sp =
    protocol === "sparkplug"
      ? new SparkplugEdgeNode({
          groupId: opts.groupId!,
          edgeNodeId: opts.edgeNodeId!,
          layout,
          now,
          publish: (m) =>
            client.publish(m.topic, m.payload, { qos: m.qos, retain: false }, (err) => {
              if (err) log(`[${gatewayId}] publish failed: ${err.message}`);
            }),
        })
      : null;

  const client: MqttClient = mqtt.connect(opts.mqttUrl, {
    username: opts.username,
    password: opts.password,
    // gateway/PROTOCOL.md: the client id is the MQTT user name (the gateway id), keep alive 1–300 s.
    clientId: opts.username,
    keepalive: 60,
    // Sparkplug B 3.0 §2 [tck-id-principles-persistence-clean-session-311]: clean session; §5.4: the NDEATH is the will.
    clean: true,
    reconnectPeriod: 2000,
    will: sp ? sp.will() : { topic: topics.status, payload: Buffer.from("offline"), qos: 1, retain: true },
  });

  let connected = false;
  /** Sparkplug: subscribed to NCMD/DCMD, so births may go out (§5.4: subscribe before the NBIRTH). */
  let spReady = false;
  let seq = 0;
  let published = 0;
  let pass = 0;
  let running = true;
  const recentEvents: SimEvent[] = [];
  let runner: PlantRunner;
  let wall0 = 0;
  let sim0S = 0;

  const record = (e: SimEvent) => {
    recentEvents.push(e);
    if (recentEvents.length > 50) recentEvents.shift();
    opts.onEvent?.(e);
    log(`[${gatewayId}] ${new Date(e.tsMs).toISOString()} ${e.kind} ${e.equipment ?? "-"}: ${e.message}`);
  };

  const newPass = (startMs: number) => {
    pass += 1;
    runner = new PlantRunner({
      scenario: opts.scenario,
      seed: opts.seed + pass - 1,
      startMs,
      stepS: opts.stepS ?? 1,
      sampleEveryS: opts.sampleEveryS ?? 10,
      layout,
    });
    wall0 = now();
    sim0S = 0;
    log(
      `[${gatewayId}] pass ${pass}: ${scenario.name} from ${new Date(startMs).toISOString()} at ${opts.speed}× (${durationS} s)`,
    );
  };
  const firstStartMs = opts.startMs ?? Math.floor(now() + (durationS / opts.speed) * 1000 - durationS * 1000);
  newPass(firstStartMs);

  const publishSamples = (samples: RunSample[]) => {
    if (opts.onSample) for (const s of samples) opts.onSample(s);
    if (sp) {
      for (const s of samples) for (const e of s.events) record(e);
      published += sp.publishSamples(samples);
      return;
    }
    const readings: Array<{ point: string; value: number | boolean | string; ts: string; quality: "good" }> = [];
    for (const s of samples) {
      for (const e of s.events) record(e);
      const ts = new Date(s.tsMs).toISOString();
      for (const r of s.readings)
        readings.push({
          point: pointName(r.equipment, kinds.get(r.equipment)!, r.quantity),
          value: wireValue(r.quantity, r.value),
          ts,
          quality: "good",
        });
    }
    for (let i = 0; i < readings.length; i += maxReadingsPerMessage) {
      const body = JSON.stringify({
        seq: seq++,
        sentAt: new Date(now()).toISOString(),
        readings: readings.slice(i, i + maxReadingsPerMessage),
      });
      client.publish(topics.readings, body, { qos: 1 }, (err) => {
        if (err) log(`[${gatewayId}] publish failed: ${err.message}`);
      });
      published += 1;
    }
  };

  // A Sparkplug (re)birth asked for between samples goes out with the last values known.
  const birthIfDue = () => {
    if (sp?.birthPending) published += sp.publishSamples([]);
  };
  const tick = () => {
    if (!connected || (sp && !spReady)) return;
    if (!running) return birthIfDue();
    // Simulated time follows the wall clock × speed, but event time never runs ahead of "now".
    const wantS = sim0S + ((now() - wall0) / 1000) * opts.speed;
    const capS = (now() - runner.startMs) / 1000;
    const untilS = Math.min(durationS, wantS, capS);
    if (untilS <= runner.tS) return birthIfDue();
    const samples: RunSample[] = [];
    runner.advanceTo(untilS, (s) => samples.push(s));
    publishSamples(samples);
    if (runner.tS >= durationS - 1e-9) {
      const endMs = runner.startMs + durationS * 1000;
      publishSamples([{ tsMs: endMs, readings: [], events: runner.flushEvents() }]);
      if (opts.loop) newPass(endMs + (opts.sampleEveryS ?? 10) * 1000);
      else {
        running = false;
        log(`[${gatewayId}] scenario finished`);
      }
    }
  };
  const timer = setInterval(tick, tickMs);

  client.on("connect", () => {
    connected = true;
    log(
      `[${gatewayId}] connected to ${opts.mqttUrl}${sp ? ` as Sparkplug edge node ${sp.groupId}/${sp.edgeNodeId} (bdSeq ${sp.bdSeq})` : ""}`,
    );
    if (sp) {
      client.subscribe(sp.commandTopics, { qos: 1 }, (err) => {
        if (err) log(`[${gatewayId}] subscribe failed: ${err.message}`);
        sp.requestBirth();
        spReady = true;
      });
      return;
    }
    client.publish(topics.status, "online", { qos: 1, retain: true });
    client.subscribe(topics.commands, { qos: 1 }, (err) => {
      if (err) log(`[${gatewayId}] subscribe failed: ${err.message}`);
    });
  });
  client.on("close", () => {
    connected = false;
    spReady = false;
  });
  // Sparkplug B 3.0 §5.4: every new CONNECT carries the next bdSeq in its will, and births follow it.
  client.on("reconnect", () => {
    if (!sp) return;
    sp.reconnecting();
    client.options.will = sp.will();
  });
  client.on("error", (err) => log(`[${gatewayId}] mqtt error: ${err.message}`));
  const applyAction = (id: string | undefined, action: DrillAction) => {
    if (!running) {
      record({
        tsMs: runner.startMs + runner.tS * 1000,
        kind: "action-refused",
        equipment: action.equipment,
        message: "Command refused: the scenario has finished",
      });
      return;
    }
    log(`[${gatewayId}] command${id ? ` ${id}` : ""}: ${JSON.stringify(action)}`);
    // Applied at the next step; the model logs acceptance or refusal with its reason.
    runner.pushAction(action);
  };
  client.on("message", (topic, payload) => {
    if (sp) {
      for (const o of sp.handleCommand(topic, payload)) {
        if (o.kind === "rebirth") log(`[${gatewayId}] rebirth requested (NCMD Node Control/Rebirth)`);
        else if (o.kind === "refused")
          record({
            tsMs: runner.startMs + runner.tS * 1000,
            kind: "action-refused",
            equipment: o.equipment,
            message: o.message,
          });
        else if (o.kind === "action") applyAction(undefined, o.action);
      }
      return;
    }
    if (topic !== topics.commands) return;
    let parsed: unknown;
    try {
      parsed = JSON.parse(payload.toString("utf8"));
    } catch {
      record({
        tsMs: runner.startMs + runner.tS * 1000,
        kind: "action-refused",
        equipment: null,
        message: "Command refused: not JSON",
      });
      return;
    }
    const result = drillCommandSchema.safeParse(parsed);
    if (!result.success) {
      record({
        tsMs: runner.startMs + runner.tS * 1000,
        kind: "action-refused",
        equipment: null,
        message: `Command refused: ${result.error.issues.map((i) => `${i.path.join(".") || "command"}: ${i.message}`).join("; ")}`,
      });
      return;
    }
    const { id, action } = actionOfCommand(result.data);
    applyAction(id, action);
  });

  return {
    async stop() {
      running = false;
      clearInterval(timer);
      if (connected && sp) {
        // Sparkplug B 3.0 §5.5 [tck-id-operational-behavior-edge-node-intentional-disconnect-ndeath]: NDEATH, then DISCONNECT.
        await new Promise<void>((resolve) =>
          client.publish(sp.topic("NDEATH"), sp.deathPayload(), { qos: 1, retain: false }, () => resolve()),
        );
      } else if (connected) {
        await new Promise<void>((resolve) =>
          client.publish(topics.status, "offline", { qos: 1, retain: true }, () => resolve()),
        );
      }
      await client.endAsync();
    },
    status() {
      return {
        gatewayId,
        protocol,
        scenario: scenario.name,
        connected,
        pass,
        simulatedMs: runner.startMs + runner.tS * 1000,
        simulatedS: runner.tS,
        durationS,
        fractionDone: Math.min(1, runner.tS / durationS),
        published,
        running,
        recentEvents: [...recentEvents],
      };
    },
  };
}
