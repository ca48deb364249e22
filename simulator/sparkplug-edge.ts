// The simulated gateway as a Sparkplug B 3.0 edge node (payloads by the npm sparkplug-payload codec).
//   one device per equipment tag (device id `CH-1`), metric names = controller-style point names (`CH1-LCHWT`),
//   NBIRTH (bdSeq, Node Control/Rebirth) + one DBIRTH per device declaring every metric with an alias,
//   a datatype and its current value, then DDATA by alias; NCMD rebirth; DCMD writes as drill actions.
// No MQTT here: the caller passes a publish function, so seq/bdSeq handling is testable without a broker.
import sparkplugPayload from "sparkplug-payload";
import { z } from "zod";
import { quantities, type EquipmentKind, type QuantityKey } from "@/lib/quantities";
import { drillActionSchema, type DrillAction } from "./actions-schema";
import { equipmentOf, type SiteLayout } from "./layout";
import { pointMapRows, pointName, pointsOf, wireValue } from "./points";
import type { RunSample } from "./run";

/** Sparkplug B 3.0 §4.1.1: the namespace element of every topic. */
export const SPARKPLUG_NAMESPACE = "spBv1.0";
const codec = sparkplugPayload.get(SPARKPLUG_NAMESPACE)!;
type Payload = Parameters<typeof codec.encodePayload>[0];
type Metric = NonNullable<Payload["metrics"]>[number];

/**
 * Group, edge node and device ids: Sparkplug B 3.0 §4.1.1 forbids `+`, `#` and `/` in them; Liftline's
 * server accepts `[A-Za-z0-9._-]{1,64}` per topic level (gateway/contract.ts), so the simulator does too.
 */
export const sparkplugIdSchema = z.string().regex(/^[A-Za-z0-9._-]{1,64}$/, "1–64 characters of A–Z a–z 0–9 . _ -");

/** Sparkplug B 3.0 §6 [tck-id-payloads-sequence-num-incrementing]: seq runs 0..255 and wraps to 0; bdSeq wraps the same way. */
export const nextSeq = (n: number): number => (n + 1) % 256;

export type SparkplugDataType = "Double" | "Boolean" | "String";

export interface SparkplugMetricDef {
  device: string;
  name: string;
  /** Unique across the node and all its devices (Sparkplug B 3.0 §6 [tck-id-payloads-alias-uniqueness]). */
  alias: number;
  quantity: QuantityKey;
  kind: EquipmentKind;
  type: SparkplugDataType;
}

/** Doubles, not 32-bit Floats: controller-rounded values such as 44.11 °F then arrive exactly. */
function dataTypeOf(q: QuantityKey): SparkplugDataType {
  const m = quantities[q].measure;
  if (m === "boolean") return "Boolean";
  if (m === "state" || m === "text") return "String";
  return "Double";
}

export interface SparkplugCatalog {
  devices: Array<{ id: string; kind: EquipmentKind; metrics: SparkplugMetricDef[] }>;
  /** `{device}/{name}` → metric */
  byKey: Map<string, SparkplugMetricDef>;
  byAlias: Map<number, SparkplugMetricDef>;
}

/** Every metric of a site in the point map's stable order, aliases 1…n (node metrics carry none). */
export function sparkplugCatalog(layout: SiteLayout): SparkplugCatalog {
  const devices: SparkplugCatalog["devices"] = [];
  const byKey = new Map<string, SparkplugMetricDef>();
  const byAlias = new Map<number, SparkplugMetricDef>();
  let alias = 0;
  for (const eq of equipmentOf(layout)) {
    const metrics = pointsOf(layout, eq.kind).map((q) => ({
      device: eq.tag,
      name: pointName(eq.tag, eq.kind, q),
      alias: ++alias,
      quantity: q,
      kind: eq.kind,
      type: dataTypeOf(q),
    }));
    for (const m of metrics) {
      byKey.set(`${m.device}/${m.name}`, m);
      byAlias.set(m.alias, m);
    }
    devices.push({ id: eq.tag, kind: eq.kind, metrics });
  }
  return { devices, byKey, byAlias };
}

/** The host maps device metrics as `{deviceId}/{metric}` (gateway/PROTOCOL.md), so the Sparkplug point map is the JSON one with the device in front. */
export function sparkplugPointMapCsv(layout: SiteLayout): string {
  const rows = pointMapRows(layout).map(
    (r) => `${r.equipment}/${r.gateway_point},${r.equipment},${r.quantity},${r.unit}`,
  );
  return ["gateway_point,equipment,quantity,unit", ...rows].join("\n") + "\n";
}

export interface SparkplugPublish {
  topic: string;
  payload: Buffer;
  qos: 0 | 1;
}

export interface SparkplugEdgeOptions {
  groupId: string;
  edgeNodeId: string;
  layout: SiteLayout;
  /** Wall clock for payload timestamps ("sent at"). */
  now: () => number;
  publish: (m: SparkplugPublish) => void;
  /** First bdSeq (default 0, Sparkplug B 3.0 §5.4 [tck-id-message-flow-edge-node-birth-publish-will-message-payload-bdSeq]). */
  bdSeq?: number;
  /** At most this many metrics per DDATA (keeps a fast run's payload far below the server's 256 KB). */
  maxMetricsPerMessage?: number;
}

export type CommandOutcome =
  | { kind: "rebirth" }
  | { kind: "action"; action: DrillAction; device: string }
  | { kind: "refused"; equipment: string | null; message: string }
  | { kind: "ignored" };

/** A command metric as decoded; zod at the boundary (values may be Long objects for integer types). */
const commandMetricSchema = z.object({
  name: z.string().optional().nullable(),
  alias: z.unknown().optional(),
  value: z.unknown(),
});

function toNumber(v: unknown): number | undefined {
  if (typeof v === "number") return v;
  if (typeof v === "bigint") return Number(v);
  if (v && typeof v === "object" && "toNumber" in v && typeof (v as { toNumber: unknown }).toNumber === "function")
    return (v as { toNumber(): number }).toNumber();
  return undefined;
}

export class SparkplugEdgeNode {
  readonly groupId: string;
  readonly edgeNodeId: string;
  readonly catalog: SparkplugCatalog;
  private readonly opts: SparkplugEdgeOptions;
  private readonly maxMetrics: number;
  private bdSeqValue: number;
  /** The seq the next message will carry. */
  private seqValue = 0;
  private birthDue = true;
  /** Last value per alias, for births between samples (a rebirth asked for mid-run). */
  private readonly last = new Map<number, { value: number | boolean | string; tsMs: number }>();

  constructor(opts: SparkplugEdgeOptions) {
    this.opts = opts;
    this.groupId = sparkplugIdSchema.parse(opts.groupId);
    this.edgeNodeId = sparkplugIdSchema.parse(opts.edgeNodeId);
    this.catalog = sparkplugCatalog(opts.layout);
    for (const d of this.catalog.devices) sparkplugIdSchema.parse(d.id);
    this.bdSeqValue = opts.bdSeq ?? 0;
    this.maxMetrics = opts.maxMetricsPerMessage ?? 2000;
  }

  get bdSeq(): number {
    return this.bdSeqValue;
  }
  get seq(): number {
    return this.seqValue;
  }
  get birthPending(): boolean {
    return this.birthDue;
  }

  topic(
    type: "NBIRTH" | "NDEATH" | "NDATA" | "NCMD" | "DBIRTH" | "DDATA" | "DDEATH" | "DCMD",
    device?: string,
  ): string {
    // Sparkplug B 3.0 §4.1.1: namespace/group_id/message_type/edge_node_id[/device_id]
    return `${SPARKPLUG_NAMESPACE}/${this.groupId}/${type}/${this.edgeNodeId}${device ? `/${device}` : ""}`;
  }

  /** Topics to subscribe before the birth, at QoS 1 (Sparkplug B 3.0 §5.4 [tck-id-message-flow-edge-node-ncmd-subscribe], §5.6 [tck-id-message-flow-device-dcmd-subscribe]). */
  get commandTopics(): string[] {
    return [this.topic("NCMD"), `${this.topic("DCMD")}/+`];
  }

  /** NDEATH: bdSeq only, no seq (Sparkplug B 3.0 §6 [tck-id-payloads-ndeath-seq], [tck-id-payloads-ndeath-bdseq]). */
  deathPayload(): Buffer {
    return Buffer.from(
      codec.encodePayload({
        timestamp: this.opts.now(),
        metrics: [{ name: "bdSeq", type: "Int64", value: this.bdSeqValue }],
      }),
    );
  }

  /** The will of the next CONNECT: NDEATH, QoS 1, not retained (Sparkplug B 3.0 §6 [tck-id-payloads-ndeath-will-message-qos], [-retain]). */
  will(): { topic: string; payload: Buffer; qos: 1; retain: false } {
    return { topic: this.topic("NDEATH"), payload: this.deathPayload(), qos: 1, retain: false };
  }

  /**
   * A new MQTT CONNECT is about to go out: bdSeq + 1, 255 → 0 (Sparkplug B 3.0 §5.4
   * [tck-id-message-flow-edge-node-birth-publish-will-message-payload-bdSeq]); births follow once connected.
   */
  reconnecting(): void {
    this.bdSeqValue = nextSeq(this.bdSeqValue);
    this.birthDue = true;
  }

  /** After (re)connecting and subscribing, or on a rebirth request: NBIRTH + DBIRTHs before the next data. */
  requestBirth(): void {
    this.birthDue = true;
  }

  private takeSeq(): number {
    const s = this.seqValue;
    this.seqValue = nextSeq(s);
    return s;
  }

  private absorb(sample: RunSample): void {
    for (const r of sample.readings) {
      const def = this.catalog.byKey.get(
        `${r.equipment}/${pointName(r.equipment, this.kindOf(r.equipment), r.quantity)}`,
      );
      if (def) this.last.set(def.alias, { value: wireValue(r.quantity, r.value), tsMs: sample.tsMs });
    }
  }

  private kindOf(device: string): EquipmentKind {
    const d = this.catalog.devices.find((x) => x.id === device);
    if (!d) throw new Error(`unknown device ${device}`);
    return d.kind;
  }

  private publishBirths(): void {
    const sentAt = this.opts.now();
    // Sparkplug B 3.0 §6 [tck-id-payloads-nbirth-seq]: a birth restarts seq at 0; the bdSeq is the one of
    // this connection's will ([tck-id-payloads-nbirth-bdseq-repeat]); Node Control/Rebirth = false is required
    // ([tck-id-payloads-nbirth-rebirth-req]).
    this.seqValue = 0;
    const nbirth: Payload = {
      timestamp: sentAt,
      seq: this.takeSeq(),
      metrics: [
        { name: "bdSeq", type: "Int64", value: this.bdSeqValue },
        { name: "Node Control/Rebirth", type: "Boolean", value: false },
      ],
    };
    // BIRTH and DATA at QoS 0, not retained (Sparkplug B 3.0 §6 [tck-id-payloads-nbirth-qos], [tck-id-payloads-dbirth-qos]).
    this.opts.publish({ topic: this.topic("NBIRTH"), payload: Buffer.from(codec.encodePayload(nbirth)), qos: 0 });
    for (const d of this.catalog.devices) {
      // A DBIRTH declares every metric: name, alias, datatype and current value (Sparkplug B 3.0 §6 DBIRTH).
      const metrics: Metric[] = d.metrics.map((m) => {
        const v = this.last.get(m.alias)!;
        return { name: m.name, alias: m.alias, type: m.type, value: v.value, timestamp: v.tsMs };
      });
      this.opts.publish({
        topic: this.topic("DBIRTH", d.id),
        payload: Buffer.from(codec.encodePayload({ timestamp: sentAt, seq: this.takeSeq(), metrics })),
        qos: 0,
      });
    }
    this.birthDue = false;
  }

  /**
   * Publishes the samples of one wall tick. A due birth carries the first sample (or the last values known);
   * the rest go out as one DDATA per device, by alias. Every metric of every sample is sent, as in the JSON
   * contract: the server judges staleness per point by event time, so report-by-exception would age
   * unchanging points. Nothing is published while a birth is due and no value is known yet.
   */
  publishSamples(samples: RunSample[]): number {
    let published = 0;
    let from = 0;
    if (this.birthDue) {
      if (samples.length > 0) {
        this.absorb(samples[0]);
        from = 1;
      }
      if (this.last.size < this.catalog.byAlias.size) return 0;
      this.publishBirths();
      published += 1 + this.catalog.devices.length;
    }
    const rest = samples.slice(from);
    if (rest.length === 0) return published;
    for (const s of rest) this.absorb(s);
    const sentAt = this.opts.now();
    for (const d of this.catalog.devices) {
      const metrics: Metric[] = [];
      for (const s of rest) {
        for (const r of s.readings) {
          if (r.equipment !== d.id) continue;
          const def = this.catalog.byKey.get(`${d.id}/${pointName(d.id, d.kind, r.quantity)}`);
          if (!def) continue;
          // The datatype is kept in DATA although §6 says it SHOULD NOT be: the sparkplug-payload decoder
          // (which the Liftline host uses) reads the value by it.
          metrics.push({ alias: def.alias, type: def.type, value: wireValue(r.quantity, r.value), timestamp: s.tsMs });
        }
      }
      for (let i = 0; i < metrics.length; i += this.maxMetrics) {
        this.opts.publish({
          topic: this.topic("DDATA", d.id),
          payload: Buffer.from(
            codec.encodePayload({
              timestamp: sentAt,
              seq: this.takeSeq(),
              metrics: metrics.slice(i, i + this.maxMetrics),
            }),
          ),
          qos: 0,
        });
        published += 1;
      }
    }
    return published;
  }

  /** NCMD (rebirth) and DCMD (writes to the drill points) addressed to this node. */
  handleCommand(topic: string, payload: Buffer): CommandOutcome[] {
    const parts = topic.split("/");
    const type = parts[2];
    const device = parts[4];
    if (
      parts[0] !== SPARKPLUG_NAMESPACE ||
      parts[1] !== this.groupId ||
      parts[3] !== this.edgeNodeId ||
      (type !== "NCMD" && type !== "DCMD")
    )
      return [{ kind: "ignored" }];
    let decoded: Payload;
    try {
      decoded = codec.decodePayload(new Uint8Array(payload));
    } catch {
      return [
        {
          kind: "refused",
          equipment: device ?? null,
          message: `Command refused: ${type} is not a Sparkplug B payload`,
        },
      ];
    }
    const metrics: Array<z.infer<typeof commandMetricSchema>> = [];
    for (const raw of decoded.metrics ?? []) {
      const m = commandMetricSchema.safeParse(raw);
      if (m.success) metrics.push(m.data);
    }
    if (type === "NCMD") {
      // Sparkplug B 3.0 §6 (Node Control/Rebirth): true asks for a new NBIRTH + DBIRTHs; seq restarts, bdSeq stays (same CONNECT).
      const rebirth = metrics.some((m) => m.name === "Node Control/Rebirth" && m.value === true);
      if (rebirth) {
        this.birthDue = true;
        return [{ kind: "rebirth" }];
      }
      return [
        {
          kind: "refused",
          equipment: null,
          message: `Command refused: NCMD ${metrics.map((m) => m.name ?? "?").join(", ") || "(no metrics)"} not supported`,
        },
      ];
    }
    if (!device || !this.catalog.devices.some((d) => d.id === device))
      return [
        { kind: "refused", equipment: device ?? null, message: `Command refused: unknown device "${device ?? ""}"` },
      ];
    // Resolve each written metric by name or alias (Sparkplug B 3.0 §6: commands may use the birth's aliases).
    const writes = new Map<QuantityKey, unknown>();
    const out: CommandOutcome[] = [];
    for (const m of metrics) {
      const alias = toNumber(m.alias);
      const def = m.name
        ? this.catalog.byKey.get(`${device}/${m.name}`)
        : alias !== undefined
          ? this.catalog.byAlias.get(alias)
          : undefined;
      if (!def || def.device !== device) {
        out.push({
          kind: "refused",
          equipment: device,
          message: `Command refused: ${device} has no metric ${m.name ?? `alias ${String(alias)}`}`,
        });
        continue;
      }
      writes.set(
        def.quantity,
        typeof m.value === "boolean" || typeof m.value === "string" ? m.value : (toNumber(m.value) ?? m.value),
      );
    }
    for (const r of drillActionsOfWrites(device, this.kindOf(device), writes)) out.push(r);
    return out;
  }
}

/**
 * DCMD writes → drill actions. Writable: CT-1 FAN-MODE (with FAN-HZ for hand) and FAN-FLT=false (reset);
 * CT-1 bypass valve position; chillers ENABLE, ALARM=false (reset), STS-TMR / SPS-TMR (seconds); air handlers RUN.
 * Checked with zod.
 */
export function drillActionsOfWrites(
  device: string,
  kind: EquipmentKind,
  writes: Map<QuantityKey, unknown>,
): CommandOutcome[] {
  const out: CommandOutcome[] = [];
  const push = (candidate: unknown) => {
    const r = drillActionSchema.safeParse(candidate);
    if (r.success) out.push({ kind: "action", action: r.data, device });
    else
      out.push({
        kind: "refused",
        equipment: device,
        message: `Command refused: ${r.error.issues.map((i) => `${i.path.join(".") || "value"}: ${i.message}`).join("; ")}`,
      });
  };
  for (const [q, value] of writes) {
    if (kind === "cooling_tower" && q === "fan_drive_mode")
      push({
        type: "set-fan-drive-mode",
        equipment: device,
        mode: value,
        ...(writes.has("fan_drive_frequency") ? { handHz: writes.get("fan_drive_frequency") } : {}),
      });
    else if (kind === "cooling_tower" && q === "fan_drive_frequency") {
      if (!writes.has("fan_drive_mode"))
        out.push({
          kind: "refused",
          equipment: device,
          message: "Command refused: write the fan drive mode (hand) together with its frequency",
        });
    } else if ((kind === "cooling_tower" && q === "fan_drive_fault") || (kind === "chiller" && q === "chiller_alarm")) {
      if (value === false) push({ type: "reset-alarm", equipment: device });
      else
        out.push({
          kind: "refused",
          equipment: device,
          message: "Command refused: an alarm can only be reset (written false)",
        });
    } else if (kind === "chiller" && (q === "start_to_start_timer_setting" || q === "stop_to_start_timer_setting"))
      push({
        type: "set-anti-recycle-timer",
        equipment: device,
        timer: q === "start_to_start_timer_setting" ? "start-to-start" : "stop-to-start",
        seconds: value,
      });
    else if (kind === "chiller" && q === "run_enable_command")
      push({ type: "set-chiller-enable", equipment: device, enabled: value });
    else if (kind === "cooling_tower" && q === "tower_bypass_valve_position")
      push({ type: "set-tower-bypass", equipment: device, positionPct: value });
    else if (kind === "air_handler" && q === "run_status")
      push({ type: "set-air-handler", equipment: device, run: value });
    else out.push({ kind: "refused", equipment: device, message: `Command refused: ${q} of ${device} is read-only` });
  }
  return out;
}
