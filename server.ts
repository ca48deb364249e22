// Liftline's one process: the web app (Next), live updates (socket.io) and the MQTT broker
// the site gateways publish to, on one machine. This file only wires parts together.
import { createServer, type IncomingMessage } from "node:http";
import path from "node:path";
import next from "next";
import { migrateDb, openDb, setDb } from "./db/client";
import { alarmSummaryBySite } from "./db/queries/alarms";
import { demoAccounts, seedDemo, SERVICE_ORG } from "./db/seed/demo";
import { loadGatewayConfig } from "./gateway/config";
import { startGatewaySide, type GatewaySide } from "./gateway/index";
import { CLIENT_ADDRESS_HEADER } from "./lib/auth/session";
import { systemViewer } from "./lib/auth/viewer";
import { createLivePublisher, type LivePublisher } from "./lib/realtime/live";
import { createRealtimeServer } from "./lib/realtime/server";
import { createRuleFeed } from "./lib/server/alarms/feed";
import { startAlarmSystem } from "./lib/server/alarms/start";
import { alarmSide } from "./lib/server/board/site-status";
import { buildIfNeeded } from "./lib/server/build";
import { loadConfig } from "./lib/server/config";
import { setRuntime } from "./lib/server/runtime";
import { resolveAuthSecret } from "./lib/server/secret";
import { createSimulationManager, type SimulationManager } from "./lib/server/simulation/manager";

process.env.NEXT_TELEMETRY_DISABLED = "1";

const log = (line: string) => console.log(line);

const { config, gatewayConfig } = (() => {
  try {
    return { config: loadConfig(), gatewayConfig: loadGatewayConfig() };
  } catch (err) {
    console.error(err instanceof Error ? err.message : err);
    process.exit(1);
  }
})();

const dir = process.cwd();
const dev = config.NODE_ENV === "development";
const databasePath = path.resolve(config.DATABASE_PATH);
const publicUrl = config.NEXTAUTH_URL ?? `http://localhost:${config.PORT}`;
const authSecret = resolveAuthSecret(config.AUTH_SECRET, path.dirname(databasePath));

// Route handlers run inside Next in this same process and read these.
process.env.DATABASE_PATH = databasePath;
process.env.NEXTAUTH_SECRET = authSecret;
process.env.NEXTAUTH_URL = publicUrl;

const db = openDb(databasePath);
migrateDb(db);
setDb(db);
if (config.LIFTLINE_DEMO) seedDemo(db, config.LIFTLINE_DEMO_PASSWORD);

if (!dev && config.LIFTLINE_BUILD_IF_NEEDED) buildIfNeeded(dir, log);

const app = next({ dev, dir, hostname: "localhost", port: config.PORT });
await app.prepare();
const handle = app.getRequestHandler();
const handleUpgrade = app.getUpgradeHandler();

function stampClientAddress(req: IncomingMessage) {
  // Sign-in rate limits key on this; a value sent by the client is never trusted.
  req.headers[CLIENT_ADDRESS_HEADER] = req.socket.remoteAddress ?? "unknown";
}

const httpServer = createServer((req, res) => {
  stampClientAddress(req);
  void handle(req, res);
});
httpServer.on("upgrade", (req, socket, head) => {
  if (req.url?.startsWith("/socket.io/")) return; // socket.io's own listener takes these
  void handleUpgrade(req, socket, head);
});

const io = createRealtimeServer(httpServer, { db, secret: authSecret });

// The alarm side of each site's board status, read with the service company's full view.
const staffViewer = systemViewer(SERVICE_ORG.id);

// Live values are pushed per site room after each commit; the gateway side is the broker
// (embedded, or a client of MQTT_URL), ingest, the batched writer and retention.
// One summary query serves every site's status push in a round; an alarm change refreshes it.
let alarmSummary = { atMs: 0, bySite: new Map() as ReturnType<typeof alarmSummaryBySite> };
const currentAlarmSummary = () => {
  if (Date.now() - alarmSummary.atMs > 1000) alarmSummary = { atMs: Date.now(), bySite: alarmSummaryBySite(db, staffViewer) };
  return alarmSummary.bySite;
};
const live = createLivePublisher({
  io,
  db,
  pushMs: gatewayConfig.LIVE_PUSH_MS,
  watched: (room) => (io.sockets.adapter.rooms.get(room)?.size ?? 0) > 0,
  alarmSummary: (siteId) => alarmSide(currentAlarmSummary(), siteId),
});

// Rule checks run on every committed reading, on event time; alarm changes refresh the board.
const alarmSystem = await startAlarmSystem({
  db,
  config,
  publicUrl,
  comms: (siteId) => ({ gatewayOnline: live.dataStatus(siteId) !== "offline" }),
  onSiteChanged: (siteId, summary) => {
    // An evaluation without a transition changes nothing on the board; a transition does.
    if (summary !== null) return;
    alarmSummary.atMs = 0;
    live.touch(siteId);
  },
  log,
});
const feedRules = createRuleFeed({ db, service: alarmSystem.service });
const liveAndRules: LivePublisher = {
  ...live,
  onCommitted(rows) {
    live.onCommitted(rows);
    feedRules(rows);
  },
};

let gatewaySide: GatewaySide;
try {
  gatewaySide = await startGatewaySide({
    db,
    live: liveAndRules,
    config: gatewayConfig,
    host: config.HOST,
    mqttPort: config.MQTT_PORT,
    mqttUrl: config.MQTT_URL,
    rawRetentionDays: config.RAW_RETENTION_DAYS,
    log,
  });
} catch (err) {
  const where = config.MQTT_URL ? `connect to the MQTT broker at ${config.MQTT_URL}` : `start the MQTT broker on port ${config.MQTT_PORT}`;
  console.error(`Could not ${where}: ${err instanceof Error ? err.message : err}`);
  process.exit(1);
}

// Demo mode's simulated plants publish through their own gateways, like real ones.
let simulation: SimulationManager | undefined;
if (config.LIFTLINE_DEMO && config.LIFTLINE_SIMULATOR) {
  if (gatewaySide.mqttPort === null) log("Simulated gateways run only with the embedded broker; skipped with MQTT_URL set.");
  else
    simulation = await createSimulationManager({
      db,
      mqttUrl: `mqtt://127.0.0.1:${gatewaySide.mqttPort}`,
      log,
      onSiteReset: (siteId, pointIds) => {
        gatewaySide.writer.forget(pointIds);
        live.forget(pointIds);
        alarmSystem.service.reload(siteId);
      },
    });
}

setRuntime({
  status: () => ({ broker: { mode: gatewaySide.mode, ...gatewaySide.status() } }),
  alarms: alarmSystem.service,
  escalator: alarmSystem.escalator,
  siteDataStatus: (siteId) => live.dataStatus(siteId),
  latestValue: (pointId) => live.latest(pointId),
  simulation,
  sendGatewayCommand: async (gatewayId, payload) => gatewaySide.sendGatewayCommand(gatewayId, payload),
});

await new Promise<void>((resolve, reject) => {
  httpServer.once("error", reject);
  httpServer.listen(config.PORT, config.HOST, () => resolve());
});
const address = httpServer.address();
const httpPort = typeof address === "object" && address ? address.port : config.PORT;

log(`Liftline is running at ${publicUrl} (${dev ? "development" : "production"}; HTTP port ${httpPort}, ${gatewaySide.mqttPort === null ? `MQTT broker ${config.MQTT_URL}` : `MQTT port ${gatewaySide.mqttPort}`})`);
if (simulation) {
  await simulation.startDefaults();
  log("Simulated plants: two normal days and one power-blip incident (Millbrook High School), each through its own gateway. Set LIFTLINE_SIMULATOR=0 to run without them.");
}
if (config.LIFTLINE_DEMO) {
  log(`Demo sign-ins (demo data only; password: ${config.LIFTLINE_DEMO_PASSWORD}):`);
  for (const a of demoAccounts()) log(`  ${a.role.padEnd(10)} ${a.email.padEnd(32)} ${a.organization}`);
}

let stopping = false;
async function shutdown(signal: string) {
  if (stopping) return;
  stopping = true;
  log(`${signal}: shutting down`);
  const force = setTimeout(() => process.exit(1), 10_000);
  force.unref();
  try {
    // Stop the simulated gateways, stop taking messages, commit what was accepted, then stop pushing.
    await simulation?.close();
    await gatewaySide.close();
    await alarmSystem.close();
    live.stop();
    io.close();
    await new Promise<void>((resolve) => httpServer.close(() => resolve()));
    await app.close?.();
  } finally {
    setDb(undefined);
    db.$client.close();
    process.exit(0);
  }
}
process.on("SIGINT", () => void shutdown("SIGINT"));
process.on("SIGTERM", () => void shutdown("SIGTERM"));
