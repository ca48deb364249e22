// A drill action as a Sparkplug B DCMD: the host writes the metric the gateway's point map names for the
// action's equipment and quantity, on `spBv1.0/{group}/DCMD/{edge}/{device}` (Sparkplug B 3.0 §4.1.1,
// §6 DCMD). Liftline never writes to real controllers: only simulated training gateways receive these.
import sparkplugPayload from "sparkplug-payload";

const codec = sparkplugPayload.get("spBv1.0")!;

export interface CommandAction {
  type: string;
  equipment: string;
  [k: string]: unknown;
}

export interface MappedPoint {
  /** `{deviceId}/{metric}` as the host maps Sparkplug device metrics (gateway/PROTOCOL.md). */
  gatewayPoint: string;
  equipmentTag: string;
  quantity: string;
}

type Write = { quantity: string; value: boolean | string | number; type: "Boolean" | "String" | "Double" };

/** The writes that carry an action (the edge node turns them back into the action). */
export function writesOfAction(a: CommandAction): Write[] {
  switch (a.type) {
    case "set-fan-drive-mode":
      return [
        { quantity: "fan_drive_mode", value: String(a.mode), type: "String" },
        ...(typeof a.handHz === "number"
          ? [{ quantity: "fan_drive_frequency", value: a.handHz, type: "Double" as const }]
          : []),
      ];
    case "reset-alarm":
      return [
        { quantity: /^CT-/.test(a.equipment) ? "fan_drive_fault" : "chiller_alarm", value: false, type: "Boolean" },
      ];
    case "set-anti-recycle-timer":
      return [
        {
          quantity: a.timer === "start-to-start" ? "start_to_start_timer_setting" : "stop_to_start_timer_setting",
          value: Number(a.seconds),
          type: "Double",
        },
      ];
    case "set-air-handler":
      return [{ quantity: "run_status", value: a.run === true, type: "Boolean" }];
    case "set-chiller-enable":
      return [{ quantity: "run_enable_command", value: a.enabled === true, type: "Boolean" }];
    case "set-tower-bypass":
      return [{ quantity: "tower_bypass_valve_position", value: Number(a.positionPct), type: "Double" }];
    default:
      throw new Error(`no Sparkplug write for ${a.type}`);
  }
}

/** Topic and payload of the DCMD for an action, or an error naming the unmapped point. */
export function encodeDrillDcmd(
  ids: { groupId: string; edgeNodeId: string },
  action: CommandAction,
  pointMap: readonly MappedPoint[],
  nowMs: number,
): { topic: string; payload: Buffer } {
  const writes = writesOfAction(action);
  let device: string | null = null;
  const metrics = writes.map((w) => {
    const row = pointMap.find((p) => p.equipmentTag === action.equipment && p.quantity === w.quantity);
    if (!row) throw new Error(`${action.equipment} ${w.quantity} is not in the gateway's point map`);
    const slash = row.gatewayPoint.indexOf("/");
    if (slash < 1) throw new Error(`${row.gatewayPoint} is not a device metric ({device}/{metric})`);
    const d = row.gatewayPoint.slice(0, slash);
    if (device !== null && d !== device) throw new Error("an action's writes go to one device");
    device = d;
    return { name: row.gatewayPoint.slice(slash + 1), type: w.type, value: w.value };
  });
  return {
    topic: `spBv1.0/${ids.groupId}/DCMD/${ids.edgeNodeId}/${device}`,
    payload: Buffer.from(codec.encodePayload({ timestamp: nowMs, metrics })),
  };
}
