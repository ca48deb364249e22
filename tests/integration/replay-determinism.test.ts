import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { openDb, type Db } from "@/db/client";
import { getViewerById } from "@/db/queries/users";
import { RULE_CAUSES } from "@/lib/rules/replay";
import { reevaluateWindow } from "@/lib/server/replay";
import { getLayout, pointMapCsv } from "@/simulator";
import { startSimulatedGateway, type SimulatedGateway } from "@/simulator/gateway-client";
import { adminCookie, api, provisionGateway, putPointMap } from "../helpers/mqtt";
import { signIn, startServer, type TestServer } from "../helpers/server";

// Replay determinism against the real server: the power-blip scenario (simulator/scenarios/power-blip.ts)
// runs at 600× through a simulated MQTT gateway, the server's rules record alarm transitions on
// event time, and re-running the rules over the stored readings of the window must give the same
// ones: same rule, same key, same states, same event time. Any difference is listed in the failure.

const SITE = "millbrook-high";
const SCENARIO_S = 4 * 3600;
let server: TestServer;
let cookie: string;
let db: Db;
let sim: SimulatedGateway | undefined;

const waitFor = async <T>(what: string, fn: () => T | undefined, timeoutMs: number): Promise<T> => {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const v = fn();
    if (v !== undefined) return v;
    if (Date.now() > until) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 500));
  }
};

beforeAll(async () => {
  server = await startServer();
  cookie = await adminCookie(server);
  db = openDb(server.databasePath);
}, 180_000);
afterAll(async () => {
  await sim?.stop();
  db?.$client.close();
  await server?.stop();
});

describe("replay determinism", () => {
  it("re-evaluating the rules over a recorded power-blip window reproduces the recorded transitions", async () => {
    // The school's plant through a gateway of its own, with the simulator's point map, as demo mode does it.
    const gw = await provisionGateway(server, cookie, { siteId: SITE });
    const map = await putPointMap(server, cookie, gw.gateway.id, pointMapCsv(getLayout("school")!));
    expect(map.status).toBe(200);
    // Scenario second 0 is 4 h back, so at 600× the run reaches "now" as it ends (24 s).
    const runStartMs = Date.now() - SCENARIO_S * 1000;
    sim = startSimulatedGateway({
      mqttUrl: server.mqttUrl,
      username: gw.username,
      password: gw.password,
      siteLayout: "school",
      scenario: "power-blip",
      speed: 600,
      seed: 7,
      startMs: runStartMs,
      log: () => {},
    });

    const pointIds = `select p.id from points p join equipment e on e.id = p.equipment_id where e.site_id = '${SITE}'`;
    const span = () =>
      db.$client
        .prepare(`select min(ts) as fromMs, max(ts) as toMs from readings where point_id in (${pointIds})`)
        .get() as {
        fromMs: number | null;
        toMs: number | null;
      };
    const fromMs = runStartMs;
    const toMs = runStartMs + SCENARIO_S * 1000;
    await waitFor("the whole scenario stored", () => ((span().toMs ?? 0) >= toMs - 10_000 ? true : undefined), 120_000);
    expect(span().fromMs).toBeGreaterThanOrEqual(fromMs);
    // Let the last due evaluations settle (SETTLE_MS) and their transitions be saved.
    await new Promise((r) => setTimeout(r, 3000));

    const admin = getViewerById(
      db,
      db.$client.prepare("select id from users where email = 'admin@tallgrass.example'").pluck().get() as string,
    )!;
    const result = reevaluateWindow(db, admin, SITE, fromMs, toMs);
    const recorded = result.recorded.filter((t) => RULE_CAUSES.has(t.cause));
    const differences = result.differences;

    const raised = recorded.filter((t) => t.cause === "condition_active").map((t) => t.alarmKey);
    // The incident is there to compare (simulator/scenarios/power-blip.ts: blip, fan drive in OFF, trip, crossing).
    expect(raised).toEqual(
      expect.arrayContaining(["power_event_suspected:site", "tower_fan_not_in_auto:CT-1", "chiller_tripped:CH-1"]),
    );
    expect(raised.some((k) => /^(crossover_risk|restart_race|loops_crossed):CH-1$/.test(k))).toBe(true);
    expect(
      differences,
      `replay of ${new Date(fromMs).toISOString()}–${new Date(toMs).toISOString()}: ${recorded.length} recorded, ` +
        `${result.transitions.length} replayed, ${result.evaluations} evaluations; rule inputs changed since: ` +
        JSON.stringify(result.changedSince),
    ).toEqual([]);
    console.log(
      `[replay] ${recorded.length} recorded rule transitions reproduced by ${result.evaluations} evaluations over ${
        SCENARIO_S / 3600
      } h of event time`,
    );

    // The replay API returns the same window compactly: every mapped point's readings and the recorded transitions.
    const t0 = performance.now();
    const res = await api(server, cookie, `/api/sites/${SITE}/replay?from=${toMs - 3_600_000}&to=${toMs}`);
    const apiMs = performance.now() - t0;
    expect(res.status).toBe(200);
    expect(res.body.replay.points.length).toBeGreaterThan(20);
    expect(res.body.replay.points[0].tsMs.length).toBeGreaterThan(300);
    console.log(`[replay] API: 1 h window, ${res.body.replay.points.length} points in ${apiMs.toFixed(0)} ms`);
    expect((await api(server, cookie, `/api/sites/${SITE}/replay?from=0&to=${25 * 3_600_000}`)).status).toBe(400);
    const owner = await signIn(server.url, "ops@quarryridge.example");
    expect((await api(server, owner.cookie!, `/api/sites/${SITE}/replay`)).status).toBe(404);
  }, 300_000);
});
