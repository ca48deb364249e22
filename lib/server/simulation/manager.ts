import type { Db } from "@/db/client";
import { createGateway, listGateways, replacePointMap, rotateGatewayPassword } from "@/db/queries/gateways";
import { resetSiteTimeline } from "@/db/queries/simulation";
import { resetIncidentsFrom } from "@/db/queries/incidents";
import { DEMO_SITES, SERVICE_ORG } from "@/db/seed/demo";
import type { GatewayChange } from "@/gateway/index";
import { hourRebuilder } from "@/gateway/rollups";
import { systemViewer } from "@/lib/auth/viewer";
import { parsePointMapCsv } from "@/lib/point-map-csv";
import { getLayout, getScenario, pointMapCsv } from "@/simulator/index";
import { startSimulatedGateway, type SimulatedGateway } from "@/simulator/gateway-client";
import type { SimulatedSiteStatus } from "@/lib/dto/simulator";

// Demo mode's simulated plants: each demo site gets its own provisioned gateway, and a
// simulator publishes through it over MQTT exactly like a real gateway box would.

export const SIMULATED_GATEWAY_NAME = "Simulated plant gateway";

/**
 * What runs on each demo site when the server starts: two normal days, one incident on repeat.
 * `leadInS`: replay only the scenario's first seconds fast, so the run reaches "now" just before
 * the incident unfolds and the rest plays in real time, as an on-call technician would live it.
 */
export const DEFAULT_RUNS: Record<string, { scenario: string; speed: number; leadInS?: number }> = {
  "harborview-mob": { scenario: "normal-day", speed: 1 },
  "quarry-ridge-dh2": { scenario: "normal-day", speed: 1 },
  "millbrook-high": { scenario: "power-blip", speed: 20, leadInS: 20 * 60 },
};

// Provisioning is an admin act; the server does it for the demo as the service company.
const systemAdmin = systemViewer(SERVICE_ORG.id);

export interface SimulationManager {
  list(): SimulatedSiteStatus[];
  /** Starts `scenario` on a demo site at `speed`, replacing what ran there (see `start`). */
  start(siteId: string, scenario: string, speed: number, seed?: number, leadInS?: number): Promise<SimulatedSiteStatus>;
  /** Starts every demo site's default run. */
  startDefaults(): Promise<void>;
  stop(siteId: string): Promise<void>;
  close(): Promise<void>;
}

export async function createSimulationManager(deps: {
  db: Db;
  mqttUrl: string;
  log: (line: string) => void;
  /** Tells the running gateway side that a simulated gateway's point map was replaced. */
  gatewayChanged?: (gatewayId: string, change: GatewayChange) => void;
  /** Forget in-memory state derived from a site's readings (live values, rule history). */
  onSiteReset?: (siteId: string, pointIds: readonly number[]) => void;
  now?: () => number;
}): Promise<SimulationManager> {
  const { db, log } = deps;
  const now = deps.now ?? Date.now;
  const runs = new Map<string, { gateway: SimulatedGateway; speed: number; startedAt: number }>();
  const gatewayIds = new Map<string, string>();

  // One gateway per demo site, with the simulator's own point map.
  for (const site of DEMO_SITES) {
    const layout = getLayout(site.layout)!;
    let gw = listGateways(db, systemAdmin, site.id).find((g) => g.name === SIMULATED_GATEWAY_NAME && !g.revokedAt);
    if (!gw)
      gw = (await createGateway(db, systemAdmin, { siteId: site.id, name: SIMULATED_GATEWAY_NAME, protocol: "json" }))
        .gateway;
    // Through the same parser as an uploaded CSV, so the demo map is validated like any other.
    const { rows, errors } = parsePointMapCsv(pointMapCsv(layout));
    const result = replacePointMap(db, systemAdmin, gw.id, rows, errors);
    if (result.errors.length)
      log(`[sim] point map for ${site.id}: ${result.errors.length} rows refused, first: ${result.errors[0].message}`);
    deps.gatewayChanged?.(gw.id, "point_map");
    gatewayIds.set(site.id, gw.id);
  }

  // A run that starts in the past (to reach "now" at its end) replaces the site's timeline.
  function resetSite(siteId: string, fromMs: number) {
    const pointIds = resetSiteTimeline(db, siteId, fromMs, now(), hourRebuilder(db.$client));
    resetIncidentsFrom(db, siteId, fromMs);
    deps.onSiteReset?.(siteId, pointIds);
  }

  async function start(
    siteId: string,
    scenario: string,
    speed: number,
    seed = 7,
    leadInS?: number,
  ): Promise<SimulatedSiteStatus> {
    const site = DEMO_SITES.find((s) => s.id === siteId);
    const gatewayId = gatewayIds.get(siteId);
    if (!site || !gatewayId) throw new Error(`${siteId} is not a simulated site`);
    const durationS = getScenario(scenario).defaultDurationS;
    await stop(siteId);
    // The fast part (the whole run, or its lead-in) reaches "now" as it ends, so it starts that far back;
    // the simulator never stamps a reading later than "now".
    const fastS = Math.min(durationS, leadInS ?? durationS);
    const startMs = Math.floor(now() - fastS * 1000 * (1 - 1 / speed));
    resetSite(siteId, startMs);
    // A fresh password each start: the server never stores a gateway's secret, only its hash.
    const { username, password } = await rotateGatewayPassword(db, systemAdmin, gatewayId);
    const gateway = startSimulatedGateway({
      mqttUrl: deps.mqttUrl,
      username,
      password,
      scenario,
      speed,
      seed,
      siteLayout: site.layout,
      loop: true,
      startMs,
      log: (line) => log(`[sim] ${line}`),
    });
    runs.set(siteId, { gateway, speed, startedAt: now() });
    log(`[sim] ${site.name}: ${scenario} at ${speed}×`);
    return status(siteId);
  }

  async function stop(siteId: string) {
    const run = runs.get(siteId);
    if (!run) return;
    runs.delete(siteId);
    await run.gateway.stop();
  }

  function status(siteId: string): SimulatedSiteStatus {
    const site = DEMO_SITES.find((s) => s.id === siteId)!;
    const run = runs.get(siteId);
    return {
      siteId,
      siteName: site.name,
      layout: site.layout,
      gatewayId: gatewayIds.get(siteId)!,
      run: run ? { ...run.gateway.status(), speed: run.speed, startedAt: run.startedAt } : null,
    };
  }

  return {
    list: () => DEMO_SITES.map((s) => status(s.id)),
    start,
    async startDefaults() {
      for (const [siteId, run] of Object.entries(DEFAULT_RUNS))
        await start(siteId, run.scenario, run.speed, 7, run.leadInS);
    },
    stop,
    async close() {
      await Promise.all([...runs.keys()].map((id) => stop(id)));
    },
  };
}
