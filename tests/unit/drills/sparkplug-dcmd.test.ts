import { describe, expect, it } from "vitest";
import { encodeDrillDcmd } from "@/gateway/sparkplug-command";
import { SparkplugEdgeNode, sparkplugPointMapCsv } from "@/simulator/sparkplug-edge";
import { getLayout, type DrillAction } from "@/simulator";

// Drill commands to a simulator running as a Sparkplug B 3.0 edge node: the host encodes each action as a
// DCMD on `spBv1.0/{group}/DCMD/{edge}/{device}` (§4.1.1) naming the device metric from the gateway's point
// map, and the edge node decodes it back to the same action. The codec on both sides is the npm
// sparkplug-payload reference implementation of the Sparkplug B protobuf.

const layout = getLayout("data-hall")!;
const pointMap = sparkplugPointMapCsv(layout)
  .trim()
  .split("\n")
  .slice(1)
  .map((line) => {
    const [gatewayPoint, equipmentTag, quantity] = line.split(",");
    return { gatewayPoint, equipmentTag, quantity };
  });
const edge = new SparkplugEdgeNode({
  groupId: "training",
  edgeNodeId: "sim-1",
  layout,
  now: () => 0,
  publish: () => {},
});

const actions: DrillAction[] = [
  { type: "set-fan-drive-mode", equipment: "CT-1", mode: "auto" },
  { type: "set-air-handler", equipment: "AHU-2", run: false },
  { type: "set-anti-recycle-timer", equipment: "CH-1", timer: "start-to-start", seconds: 120 },
  { type: "set-anti-recycle-timer", equipment: "CH-2", timer: "stop-to-start", seconds: 60 },
  { type: "reset-alarm", equipment: "CH-1" },
  { type: "reset-alarm", equipment: "CT-1" },
  { type: "set-chiller-enable", equipment: "CH-2", enabled: true },
  { type: "set-tower-bypass", equipment: "CT-1", positionPct: 40 },
];

describe("drill actions over Sparkplug DCMD", () => {
  for (const action of actions)
    it(`${action.type} ${action.equipment} round-trips through DCMD`, () => {
      const { topic, payload } = encodeDrillDcmd({ groupId: "training", edgeNodeId: "sim-1" }, action, pointMap, 1);
      expect(topic).toBe(`spBv1.0/training/DCMD/sim-1/${action.equipment}`);
      const out = edge.handleCommand(topic, payload);
      expect(out).toEqual([{ kind: "action", action, device: action.equipment }]);
    });

  it("an action on a point the map lacks is refused before anything is sent", () => {
    expect(() =>
      encodeDrillDcmd(
        { groupId: "g", edgeNodeId: "e" },
        { type: "set-air-handler", equipment: "AHU-9", run: true },
        pointMap,
        1,
      ),
    ).toThrow(/not in the gateway's point map/);
  });
});
