import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getLayout, pointMapCsv } from "@/simulator";
import { startSimulatedGateway, type SimulatedGateway } from "@/simulator/gateway-client";
import { sparkplugPointMapCsv } from "@/simulator/sparkplug-edge";
import { startServer, type TestServer } from "../helpers/server";
import { adminCookie, api, provisionGateway, putPointMap, waitFor, type ProvisionedGateway } from "../helpers/mqtt";

// The plant simulator publishing as a Sparkplug B 3.0 edge node to the real server: NBIRTH + DBIRTHs
// declare every point with an alias, DDATA carries the samples by alias, and the host stores them
// through the site's point map. design-steady holds the AHRI 550/590 rating point: 44 °F leaving
// chilled water (REFERENCES.md §3) = 6.67 °C (NIST SP 811 B.9).

const SITE = "harborview-mob";
const GROUP = "harborview";
const EDGE = "sim-edge-1";
let server: TestServer;
let admin: string;
let gw: ProvisionedGateway;
let sim: SimulatedGateway | undefined;

interface LatestPoint {
  equipmentTag: string;
  key: string;
  value: unknown;
  tsMs: number | null;
}

async function latest(): Promise<LatestPoint[]> {
  const res = await api(server, admin, `/api/sites/${SITE}/latest`);
  return res.body.latest.points as LatestPoint[];
}

beforeAll(async () => {
  server = await startServer();
  admin = await adminCookie(server);
  gw = await provisionGateway(server, admin, {
    siteId: SITE,
    name: "Simulated Sparkplug node",
    protocol: "sparkplug",
    groupId: GROUP,
    edgeNodeId: EDGE,
  });
  const layout = getLayout("medical-office")!;
  // The host names device metrics `{deviceId}/{metric}` (gateway/PROTOCOL.md), so the Sparkplug map is the
  // simulator's JSON point map with the device (= equipment tag) in front of each name.
  const csv = sparkplugPointMapCsv(layout);
  const rows = pointMapCsv(layout).trim().split("\n").length - 1;
  const put = await putPointMap(server, admin, gw.gateway.id, csv);
  expect(put.body.accepted).toBe(rows);
}, 240_000);

afterAll(async () => {
  await sim?.stop();
  await server?.stop();
});

describe("simulator as a Sparkplug B edge node", () => {
  it("births and DDATA reach the site's latest values, every name mapped", async () => {
    const log: string[] = [];
    sim = startSimulatedGateway({
      protocol: "sparkplug",
      groupId: GROUP,
      edgeNodeId: EDGE,
      mqttUrl: server.mqttUrl,
      username: gw.username,
      password: gw.password,
      siteLayout: "medical-office",
      scenario: "design-steady",
      speed: 60,
      seed: 5,
      log: (l) => log.push(l),
    });
    const startedAt = Date.now();
    // A few seconds of publishing: births, then DDATA every 250 ms tick.
    await waitFor(
      async () =>
        (await latest()).some(
          (p) =>
            p.equipmentTag === "CH-1" &&
            p.key === "chilled_water_leaving_temp" &&
            typeof p.value === "number" &&
            (p.tsMs ?? 0) > 0,
        ),
      20_000,
    );
    await new Promise((r) => setTimeout(r, 4000));

    const points = await latest();
    const of = (tag: string, key: string) => points.find((p) => p.equipmentTag === tag && p.key === key);
    const lchwt = of("CH-1", "chilled_water_leaving_temp")!;
    expect(lchwt.value as number).toBeGreaterThan(6.67 - 0.6); // 44 °F ± ~1 °F
    expect(lchwt.value as number).toBeLessThan(6.67 + 0.6);
    expect(of("CH-1", "chilled_water_leaving_temp_setpoint")!.value as number).toBeCloseTo(6.67, 1);
    expect(of("CH-1", "run_status")!.value).toBe(true);
    expect(of("CT-1", "fan_drive_mode")!.value).toBe("auto");
    // Every point of the site's plant has a value now, and none lies in the future.
    const plant = points.filter((p) =>
      ["CH-1", "CT-1", "CHWP-1", "CWP-1", "AHU-1", "AHU-2", "AHU-3", "WS-1"].includes(p.equipmentTag),
    );
    expect(plant.length).toBeGreaterThan(0);
    for (const p of plant) {
      expect(p.value, `${p.equipmentTag}/${p.key}`).not.toBeNull();
      expect(p.tsMs!).toBeLessThanOrEqual(Date.now() + 1000);
    }

    const status = await api(server, admin, `/api/gateways/${gw.gateway.id}`);
    const g = status.body.gateway;
    expect(g.status.online).toBe(true);
    expect(g.counters.readingsAccepted).toBeGreaterThan(1000);
    expect(g.unmapped).toEqual([]);
    expect(g.counters.rejectedTotal).toBe(0);
    // No seq gap or missing birth: the host never asked for a rebirth.
    expect(server.output()).not.toMatch(new RegExp(`${gw.gateway.id}.*requesting rebirth`));
    expect(log.some((l) => /rebirth requested/.test(l))).toBe(false);
    expect(sim.status()).toMatchObject({ protocol: "sparkplug", connected: true });
    expect(Date.now() - startedAt).toBeLessThan(30_000);

    // NDEATH on a planned stop marks the node offline (its bdSeq matches the birth's).
    await sim.stop();
    sim = undefined;
    await waitFor(
      async () => (await api(server, admin, `/api/gateways/${gw.gateway.id}`)).body.gateway.status.online === false,
      10_000,
    );
  }, 60_000);
});
