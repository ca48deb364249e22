import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startServer, type TestServer } from "../helpers/server";
import {
  adminCookie,
  api,
  connectGateway,
  endClient,
  provisionGateway,
  publishQos1,
  putPointMap,
  readingsMessage,
  type ProvisionedGateway,
} from "../helpers/mqtt";

// Point-map CSV upload through the real API: a good file is applied whole, a file with bad
// rows is refused with every error by line number and nothing half-applied, and the units a
// map declares convert on ingest (factors: NIST SP 811, 2008, Appendix B.8/B.9).

const SITE = "harborview-mob";
let server: TestServer;
let admin: string;
let gw: ProvisionedGateway;

beforeAll(async () => {
  server = await startServer();
  admin = await adminCookie(server);
  gw = await provisionGateway(server, admin, { siteId: SITE, name: "Map test" });
}, 240_000);

afterAll(async () => {
  await server?.stop();
});

const GOOD = [
  "gateway_point,equipment,quantity,unit",
  "CH1-LCHWT,CH-1,chilled_water_leaving_temp,degF",
  "CH1-ECHWT,CH-1,chilled_water_entering_temp,degC",
  "CH1-EVAP-P,CH-1,evaporator_refrigerant_pressure,psig",
  "CH1-COND-P,CH-1,condenser_refrigerant_pressure,kPa",
  "CH1-CHW-FLOW,CH-1,chilled_water_flow,gpm",
  "CH1-EVAP-DP,CH-1,evaporator_water_dp,psid",
  '"CH1 KW, total",CH-1,compressor_power,kW',
  "CT1-MODE,CT-1,fan_drive_mode,state",
  "",
].join("\r\n");

describe("point-map CSV", () => {
  it("applies a good file and lists it", async () => {
    const res = await putPointMap(server, admin, gw.gateway.id, GOOD);
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ accepted: 8, errors: [] });
    const map = await api(server, admin, `/api/gateways/${gw.gateway.id}/point-map`);
    expect(map.body.pointMap.map((r: { gatewayPoint: string }) => r.gatewayPoint)).toContain("CH1 KW, total");
    expect(map.body.pointMap).toHaveLength(8);
  });

  it("refuses a file with bad rows, names each line, and leaves the old map untouched", async () => {
    const bad = [
      "gateway_point,equipment,quantity,unit", // line 1
      "CH1-LCHWT,CH-1,chilled_water_leaving_temp,degF", // 2 ok
      "CH1-X,CH-1,chilled_water_supply_temp,degF", // 3 unknown quantity (supply/return are not our words)
      "CH1-Y,CH-1,chilled_water_leaving_temp,furlongs", // 4 unknown unit
      "CH1-Z,CH-1,evaporator_refrigerant_pressure,degF", // 5 unit does not fit
      "CH9-A,CH-9,chilled_water_leaving_temp,degF", // 6 no such equipment
      "AHU1-P,AHU-1,evaporator_refrigerant_pressure,psig", // 7 equipment lacks the point
      "CH1-LCHWT,CH-1,chilled_water_entering_temp,degF", // 8 duplicate gateway point
      ",CH-1,chilled_water_flow,gpm", // 9 empty name
      "CH1-FLOW,CH-1,chilled_water_flow", // 10 too few fields
      "CH1-LCHWT2,CH-1,chilled_water_leaving_temp,degF", // 11 same point fed twice (line 2)
    ].join("\n");
    const res = await putPointMap(server, admin, gw.gateway.id, bad);
    expect(res.status).toBe(400);
    expect(res.body.accepted).toBe(0);
    expect(res.body.error.code).toBe("bad_request");
    expect(res.body.errors.map((e: { line: number }) => e.line)).toEqual([3, 4, 5, 6, 7, 8, 9, 10, 11]);
    const msg = (line: number) => res.body.errors.find((e: { line: number }) => e.line === line).message as string;
    expect(msg(3)).toMatch(/unknown quantity/);
    expect(msg(4)).toMatch(/unknown unit/);
    expect(msg(5)).toMatch(/cannot measure pressure/);
    expect(msg(6)).toMatch(/not at this site/);
    expect(msg(7)).toMatch(/has no evaporator_refrigerant_pressure/);
    expect(msg(8)).toMatch(/already mapped on line 2/);
    expect(msg(11)).toMatch(/already fed by line 2/);
    const map = await api(server, admin, `/api/gateways/${gw.gateway.id}/point-map`);
    expect(map.body.pointMap).toHaveLength(8);
  });

  it("refuses a file without the required columns", async () => {
    const res = await putPointMap(server, admin, gw.gateway.id, "name,tag\nA,B\n");
    expect(res.status).toBe(400);
    expect(res.body.errors).toEqual([
      { line: 1, message: expect.stringMatching(/missing column\(s\): gateway_point, equipment, quantity, unit/) },
    ]);
  });

  it("converts each declared unit to the point's canonical unit on ingest", async () => {
    const client = await connectGateway(server, gw);
    const ts = new Date(Date.now() - 1000).toISOString();
    await publishQos1(
      client,
      `liftline/${gw.gateway.id}/readings`,
      readingsMessage([
        { point: "CH1-LCHWT", value: 44, ts },
        { point: "CH1-ECHWT", value: 12.5, ts },
        { point: "CH1-EVAP-P", value: 37.5, ts },
        { point: "CH1-COND-P", value: 900, ts },
        { point: "CH1-CHW-FLOW", value: 720, ts },
        { point: "CH1-EVAP-DP", value: 8, ts },
        { point: "CH1 KW, total", value: 180, ts },
      ]),
    );
    await endClient(client);
    const latest = (await api(server, admin, `/api/sites/${SITE}/latest`)).body.latest;
    const v = (key: string) =>
      latest.points.find((p: { equipmentTag: string; key: string }) => p.equipmentTag === "CH-1" && p.key === key)
        .value as number;
    // NIST SP 811 B.9: t/°C = (t/°F − 32)/1.8
    expect(v("chilled_water_leaving_temp")).toBeCloseTo((44 - 32) / 1.8, 6);
    expect(v("chilled_water_entering_temp")).toBeCloseTo(12.5, 9);
    // B.8: 1 psi = 6.894757 kPa; gauge + 1 standard atmosphere (101.325 kPa) = absolute
    expect(v("evaporator_refrigerant_pressure")).toBeCloseTo(37.5 * 6.894757 + 101.325, 3);
    expect(v("condenser_refrigerant_pressure")).toBeCloseTo(900, 9);
    // B.8: 1 gal (U.S.)/min = 6.309020 E-05 m³/s = 0.06309020 L/s
    expect(v("chilled_water_flow")).toBeCloseTo(720 * 0.0630902, 3);
    // A differential pressure has no atmosphere offset.
    expect(v("evaporator_water_dp")).toBeCloseTo(8 * 6.894757, 4);
    expect(v("compressor_power")).toBe(180);
  });
});
