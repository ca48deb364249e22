import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { api, connectGateway, provisionGateway, putPointMap, readingsMessage, waitFor } from "../helpers/mqtt";
import { signIn, startServer, type TestServer } from "../helpers/server";

// An alarm keeps what it read when raised beside what it reads now: a chiller's leaving water 4.7 K
// over a 44 °F setpoint raises "chilled water not made" after its 15 min on-delay, then climbs further.
// The stored raised words keep 50.0 °F; the latest words and the live reading follow it to 53.6 °F.
let server: TestServer;
let tech: string;
let owner: string;
let alarmId: string;
const SITE = "millbrook-high";

beforeAll(async () => {
  server = await startServer();
  tech = (await signIn(server.url, "luis@tallgrass.example")).cookie!;
  owner = (await signIn(server.url, "facilities@millbrook.example")).cookie!;
  const admin = (await signIn(server.url, "admin@tallgrass.example")).cookie!;
  const gw = await provisionGateway(server, admin, { siteId: SITE });
  const map = await putPointMap(
    server,
    admin,
    gw.gateway.id,
    "gateway_point,equipment,quantity,unit\nCH2-RUN,CH-2,run_status,bool\nCH2-CHWL,CH-2,chilled_water_leaving_temp,degC\n",
  );
  expect(map.status).toBe(200);
  const client = await connectGateway(server, gw);
  // 25 min of event time ending now, a sample every 10 s: 10 °C (50 °F) for 20 min, then 12 °C (53.6 °F).
  const t0 = Date.now() - 25 * 60_000;
  const samples = Array.from({ length: 151 }, (_, i) => {
    const ts = new Date(t0 + i * 10_000).toISOString();
    return [
      { point: "CH2-RUN", value: true, ts },
      { point: "CH2-CHWL", value: i < 120 ? 10 : 12, ts },
    ];
  });
  for (let i = 0; i < samples.length; i += 25)
    await client.publishAsync(
      `liftline/${gw.gateway.id}/readings`,
      readingsMessage(samples.slice(i, i + 25).flat(), i),
      { qos: 1 },
    );
  await client.endAsync();
  alarmId = await waitFor(
    async () => {
      const { body } = await api(server, tech, `/api/alarms?site=${SITE}`);
      return (body.alarms as Array<{ id: string; ruleId: string; equipment: string }> | undefined)?.find(
        (a) => a.ruleId === "chilled_water_not_made" && a.equipment === "CH-2",
      )?.id;
    },
    15_000,
    200,
  );
});
afterAll(() => server?.stop());

describe("an alarm's words when raised and now", () => {
  it("keeps the raised figures while the latest follow the reading", async () => {
    const alarm = await waitFor(
      async () => {
        const { body } = await api(server, tech, `/api/alarms/${alarmId}`);
        return body.alarm?.detail.numbers.leavingC === 12 ? body.alarm : null;
      },
      10_000,
      200,
    );
    expect(alarm.raisedDetail.numbers.leavingC).toBe(10);
    // In the technician's units (°F by default), never both systems side by side.
    expect(alarm.raisedDetail.technicianMessage).toContain("50.0 °F");
    expect(alarm.detail.technicianMessage).toContain("53.6 °F");
    expect(alarm.raisedDetail.atMs).toBeLessThan(alarm.detail.atMs);
  });

  it("the alarm page sets the reading when raised beside now, for staff only", async () => {
    const res = await fetch(`${server.url}/alarms/${alarmId}`, { headers: { cookie: tech } });
    const html = await res.text();
    expect(res.status).toBe(200);
    expect(html).toContain('data-testid="then-and-now"');
    // The stored reading at the raise (the 15 min on-delay after the first 10 °C sample).
    expect(html).toMatch(/data-testid="raised-value"[^>]*>50\.0 °F</);
    expect(html).toContain('data-testid="raised-words"');
    const ownerHtml = await (await fetch(`${server.url}/alarms/${alarmId}`, { headers: { cookie: owner } })).text();
    expect(ownerHtml).not.toContain('data-testid="then-and-now"');
  });
});
