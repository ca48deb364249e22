import type { Db } from "@/db/client";
import { createGateway, listGateways, replacePointMap, rotateGatewayPassword } from "@/db/queries/gateways";
import { resetSiteTimeline } from "@/db/queries/simulation";
import { resetIncidentsFrom } from "@/db/queries/incidents";
import { SERVICE_ORG } from "@/db/seed/demo";
import { listTrainingSites, TRAINING_GATEWAY_PREFIX } from "@/db/queries/drills";
import type { GatewayChange } from "@/gateway/index";
import { hourRebuilder } from "@/gateway/rollups";
import { systemViewer } from "@/lib/auth/viewer";
import { parsePointMapCsv } from "@/lib/point-map-csv";
import { getLayout, getScenario, pointMapCsv, type RunSample, type Scenario, type SimEvent } from "@/simulator/index";
import { startSimulatedGateway, type SimulatedGateway } from "@/simulator/gateway-client";
import { sparkplugPointMapCsv } from "@/simulator/sparkplug-edge";
import type { SimulatedSiteStatus } from "@/lib/dto/simulator";

// Simulated plants: each demo site (demo mode) and each training site gets its own provisioned gateway,
// and a simulator publishes through it over MQTT exactly like a real gateway box would. A training
// site's gateway may speak Sparkplug B instead; drills then reach it as DCMD writes.

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

/** A site a simulator may run on: a demo site (by the seed) or a training site (by an admin). */
export interface SimulatedSite {
  id: string;
  name: string;
  layout: string;
  training?: boolean;
  protocol?: "json" | "sparkplug";
}

/** A drill's run: once through, and told of every sample and event. */
export interface RunHooks {
  loop?: boolean;
  /** Simulated seconds between samples (default 10). */
  sampleEveryS?: number;
  onSample?: (s: RunSample) => void;
  onEvent?: (e: SimEvent) => void;
}

export interface SimulatedGatewayRef {
  gatewayId: string;
  protocol: "json" | "sparkplug";
  groupId: string | null;
  edgeNodeId: string | null;
}

export interface SimulationManager {
  list(): SimulatedSiteStatus[];
  /** Starts `scenario` on a simulated site at `speed`, replacing what ran there (see `start`). */
  start(
    siteId: string,
    scenario: string | Scenario,
    speed: number,
    seed?: number,
    leadInS?: number,
    hooks?: RunHooks,
  ): Promise<SimulatedSiteStatus>;
  /** Provisions a training site's simulated gateway (JSON or Sparkplug B) with the layout's point map. */
  addTrainingSite(site: SimulatedSite): Promise<SimulatedGatewayRef>;
  gatewayOf(siteId: string): SimulatedGatewayRef | undefined;
  /** Starts every demo site's default run. */
  startDefaults(): Promise<void>;
  stop(siteId: string): Promise<void>;
  close(): Promise<void>;
}

export async function createSimulationManager(deps: {
  db: Db;
  /** The demo sites to simulate (none when demo mode or its simulator is off); training sites are read from the database. */
  demoSites: readonly SimulatedSite[];
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
  const gatewayIds = new Map<string, SimulatedGatewayRef>();
  const siteList: SimulatedSite[] = [];

  async function provision(site: SimulatedSite, name: string): Promise<SimulatedGatewayRef> {
    const layout = getLayout(site.layout)!;
    const protocol = site.protocol ?? "json";
    let gw = listGateways(db, systemAdmin, site.id).find((g) => g.name === name && !g.revokedAt);
    if (!gw)
      gw = (
        await createGateway(db, systemAdmin, {
          siteId: site.id,
          name,
          protocol,
          ...(protocol === "sparkplug" ? { groupId: "training", edgeNodeId: site.id.slice(0, 64) } : {}),
        })
      ).gateway;
    // Through the same parser as an uploaded CSV, so the simulated map is validated like any other.
    const { rows, errors } = parsePointMapCsv(
      protocol === "sparkplug" ? sparkplugPointMapCsv(layout) : pointMapCsv(layout),
    );
    const result = replacePointMap(db, systemAdmin, gw.id, rows, errors);
    if (result.errors.length)
      log(`[sim] point map for ${site.id}: ${result.errors.length} rows refused, first: ${result.errors[0].message}`);
    deps.gatewayChanged?.(gw.id, "point_map");
    const ref = { gatewayId: gw.id, protocol, groupId: gw.groupId, edgeNodeId: gw.edgeNodeId };
    gatewayIds.set(site.id, ref);
    if (!siteList.some((s) => s.id === site.id)) siteList.push(site);
    return ref;
  }

  // One gateway per demo site, with the simulator's own point map.
  for (const site of deps.demoSites) await provision(site, SIMULATED_GATEWAY_NAME);
  // Training sites made earlier keep their gateway (its name carries the layout).
  for (const t of listTrainingSites(db, systemAdmin))
    if (t.gatewayId && getLayout(t.layout))
      await provision(
        { id: t.id, name: t.name, layout: t.layout, training: true, protocol: t.protocol },
        TRAINING_GATEWAY_PREFIX + t.layout,
      );

  // A run that starts in the past (to reach "now" at its end) replaces the site's timeline.
  function resetSite(siteId: string, fromMs: number) {
    const pointIds = resetSiteTimeline(db, siteId, fromMs, now(), hourRebuilder(db.$client));
    resetIncidentsFrom(db, siteId, fromMs);
    deps.onSiteReset?.(siteId, pointIds);
  }

  async function start(
    siteId: string,
    scenario: string | Scenario,
    speed: number,
    seed = 7,
    leadInS?: number,
    hooks: RunHooks = {},
  ): Promise<SimulatedSiteStatus> {
    const site = siteList.find((s) => s.id === siteId);
    const ref = gatewayIds.get(siteId);
    if (!site || !ref) throw new Error(`${siteId} is not a simulated site`);
    const sc = typeof scenario === "string" ? getScenario(scenario) : scenario;
    const durationS = sc.defaultDurationS;
    await stop(siteId);
    // The fast part (the whole run, or its lead-in) reaches "now" as it ends, so it starts that far back;
    // the simulator never stamps a reading later than "now".
    const fastS = Math.min(durationS, leadInS ?? durationS);
    const startMs = Math.floor(now() - fastS * 1000 * (1 - 1 / speed));
    resetSite(siteId, startMs);
    // A fresh password each start: the server never stores a gateway's secret, only its hash.
    const { username, password } = await rotateGatewayPassword(db, systemAdmin, ref.gatewayId);
    const gateway = startSimulatedGateway({
      mqttUrl: deps.mqttUrl,
      username,
      password,
      scenario: sc,
      speed,
      seed,
      siteLayout: site.layout,
      loop: hooks.loop ?? true,
      sampleEveryS: hooks.sampleEveryS,
      startMs,
      log: (line) => log(`[sim] ${line}`),
      onSample: hooks.onSample,
      onEvent: hooks.onEvent,
      ...(ref.protocol === "sparkplug"
        ? { protocol: "sparkplug" as const, groupId: ref.groupId!, edgeNodeId: ref.edgeNodeId! }
        : {}),
    });
    runs.set(siteId, { gateway, speed, startedAt: now() });
    log(`[sim] ${site.name}: ${sc.name} at ${speed}×`);
    return status(siteId);
  }

  async function stop(siteId: string) {
    const run = runs.get(siteId);
    if (!run) return;
    runs.delete(siteId);
    await run.gateway.stop();
  }

  function status(siteId: string): SimulatedSiteStatus {
    const site = siteList.find((s) => s.id === siteId)!;
    const run = runs.get(siteId);
    return {
      siteId,
      siteName: site.name,
      layout: site.layout,
      gatewayId: gatewayIds.get(siteId)!.gatewayId,
      run: run ? { ...run.gateway.status(), speed: run.speed, startedAt: run.startedAt } : null,
    };
  }

  return {
    list: () => siteList.map((s) => status(s.id)),
    start,
    addTrainingSite: (site) => provision({ ...site, training: true }, TRAINING_GATEWAY_PREFIX + site.layout),
    gatewayOf: (siteId) => gatewayIds.get(siteId),
    async startDefaults() {
      for (const [siteId, run] of Object.entries(DEFAULT_RUNS))
        if (deps.demoSites.some((s) => s.id === siteId)) await start(siteId, run.scenario, run.speed, 7, run.leadInS);
    },
    stop,
    async close() {
      await Promise.all([...runs.keys()].map((id) => stop(id)));
    },
  };
}
