import { createServer, type IncomingMessage } from "node:http";
import path from "node:path";
import next from "next";
import { migrateDb, openDb, type Db } from "@/db/client";
import { demoAccounts, seedDemo, SERVICE_ORG } from "@/db/seed/demo";
import { startGatewaySide } from "@/gateway/index";
import { CLIENT_ADDRESS_HEADER } from "@/lib/auth/session";
import { systemViewer } from "@/lib/auth/viewer";
import { createRuleFeed } from "./alarms/feed";
import { startAlarmSystem } from "./alarms/start";
import { createBoardAlarmSummary } from "./board/site-status";
import { buildIfNeeded } from "./build";
import type { Config } from "./config";
import { createLivePublisher } from "./realtime/live";
import { createRealtimeServer } from "./realtime/server";
import { setDb, setRuntime, setStorageHealth } from "./runtime";
import { resolveAuthSecret } from "./secret";
import { createSimulationManager, type SimulationManager } from "./simulation/manager";
import { startStorageAlarm } from "./storage-alarm";
import { createStorageHealth } from "./storage-health";

// Liftline's one process: the web app (Next), live updates (socket.io), the MQTT gateway side,
// rule checks with alarms and paging, and in demo mode the simulated plants. server.ts calls
// this once; tests call it through server.ts in a child process.

export interface LiftlineOptions {
  config: Config;
  /** The project folder Next serves from. */
  dir?: string;
  log?: (line: string) => void;
}

export interface Liftline {
  url: string;
  httpPort: number;
  /** null with an external broker (MQTT_URL). */
  mqttPort: number | null;
  db: Db;
  close(): Promise<void>;
}

export async function startLiftline(opts: LiftlineOptions): Promise<Liftline> {
  const { config } = opts;
  const log = opts.log ?? ((line: string) => console.log(line));
  const dir = opts.dir ?? process.cwd();
  const dev = config.NODE_ENV === "development";
  const databasePath = path.resolve(config.DATABASE_PATH);
  const publicUrl = config.NEXTAUTH_URL ?? `http://localhost:${config.PORT}`;
  const authSecret = resolveAuthSecret(config.AUTH_SECRET, path.dirname(databasePath));

  // Route handlers run inside Next in this same process and read these.
  process.env.NEXT_TELEMETRY_DISABLED = "1";
  process.env.DATABASE_PATH = databasePath;
  process.env.NEXTAUTH_SECRET = authSecret;
  process.env.NEXTAUTH_URL = publicUrl;

  const db = openDb(databasePath);
  migrateDb(db);
  setDb(db);
  if (config.LIFTLINE_DEMO) seedDemo(db, config.LIFTLINE_DEMO_PASSWORD);
  if (!dev && config.LIFTLINE_BUILD_IF_NEEDED) buildIfNeeded(dir, log);
  const storage = createStorageHealth({ recoveryMs: config.STORAGE_RECOVERY_S * 1000, log });
  setStorageHealth(storage);

  const app = next({ dev, dir, hostname: "localhost", port: config.PORT });
  await app.prepare();
  const handle = app.getRequestHandler();
  const handleUpgrade = app.getUpgradeHandler();

  const httpServer = createServer((req, res) => {
    stampClientAddress(req);
    void handle(req, res);
  });
  httpServer.on("upgrade", (req, socket, head) => {
    if (req.url?.startsWith("/socket.io/")) return; // socket.io's own listener takes these
    void handleUpgrade(req, socket, head);
  });
  const io = createRealtimeServer(httpServer, { db, secret: authSecret });

  const boardAlarms = createBoardAlarmSummary(db, systemViewer(SERVICE_ORG.id));
  const live = createLivePublisher({
    io,
    db,
    pushMs: config.LIVE_PUSH_MS,
    watched: (room) => (io.sockets.adapter.rooms.get(room)?.size ?? 0) > 0,
    alarmSummary: (siteId) => boardAlarms.side(siteId),
  });

  const alarmSystem = await startAlarmSystem({
    db,
    config,
    publicUrl,
    comms: (siteId) => ({ gatewayOnline: live.dataStatus(siteId) !== "offline" }),
    onSiteChanged: (siteId, summary) => {
      // An evaluation without a transition changes nothing on the board; a transition does.
      if (summary !== null) return;
      boardAlarms.invalidate();
      live.touch(siteId);
    },
    log,
    storage,
  });
  const stopStorageAlarm = startStorageAlarm({ db, health: storage, mailer: alarmSystem.mailer, publicUrl, log });
  const feedRules = createRuleFeed({ db, service: alarmSystem.service });

  const gatewaySide = await startGatewaySide({
    db,
    config,
    onCommitted: [live.onCommitted, feedRules],
    onPresence: live.presenceChanged,
    onMappingChanged: live.mappingChanged,
    storage: { failed: (err, where) => void storage.report(err, where), committed: () => storage.ok() },
    log,
  }).catch((err: unknown) => {
    const where = config.MQTT_URL
      ? `connect to the MQTT broker at ${config.MQTT_URL}`
      : `start the MQTT broker on port ${config.MQTT_PORT}`;
    throw new Error(`Could not ${where}: ${err instanceof Error ? err.message : err}`, { cause: err });
  });

  // Demo mode's simulated plants publish through their own gateways, like real ones.
  let simulation: SimulationManager | undefined;
  if (config.LIFTLINE_DEMO && config.LIFTLINE_SIMULATOR) {
    if (gatewaySide.mqttPort === null)
      log("Simulated gateways run only with the embedded broker; skipped with MQTT_URL set.");
    else
      simulation = await createSimulationManager({
        db,
        mqttUrl: `mqtt://127.0.0.1:${gatewaySide.mqttPort}`,
        log,
        gatewayChanged: (gatewayId, change) => gatewaySide.gatewayChanged(gatewayId, change),
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
    gatewayChanged: (gatewayId, change) => gatewaySide.gatewayChanged(gatewayId, change),
    heldMail: () => alarmSystem.mailer.held(),
  });

  await new Promise<void>((resolve, reject) => {
    httpServer.once("error", reject);
    httpServer.listen(config.PORT, config.HOST, () => resolve());
  });
  const address = httpServer.address();
  const httpPort = typeof address === "object" && address ? address.port : config.PORT;

  log(
    `Liftline is running at ${publicUrl} (${dev ? "development" : "production"}; HTTP port ${httpPort}, ${gatewaySide.mqttPort === null ? `MQTT broker ${config.MQTT_URL}` : `MQTT port ${gatewaySide.mqttPort}`})`,
  );
  if (simulation) {
    await simulation.startDefaults();
    log(
      "Simulated plants: two normal days and one power-blip incident (Millbrook High School), each through its own gateway. Set LIFTLINE_SIMULATOR=0 to run without them.",
    );
  }
  if (config.LIFTLINE_DEMO) {
    log(`Demo sign-ins (demo data only; password: ${config.LIFTLINE_DEMO_PASSWORD}):`);
    for (const a of demoAccounts()) log(`  ${a.role.padEnd(10)} ${a.email.padEnd(32)} ${a.organization}`);
  }

  let closing: Promise<void> | undefined;
  async function close() {
    // Stop the simulated gateways, stop taking messages, commit what was accepted, then stop pushing.
    try {
      await simulation?.close();
      await gatewaySide.close();
      stopStorageAlarm();
      await alarmSystem.close();
      live.stop();
      io.close();
      await new Promise<void>((resolve) => httpServer.close(() => resolve()));
      await app.close?.();
    } finally {
      setRuntime(undefined);
      setDb(undefined);
      db.$client.close();
    }
  }

  return { url: publicUrl, httpPort, mqttPort: gatewaySide.mqttPort, db, close: () => (closing ??= close()) };
}

function stampClientAddress(req: IncomingMessage) {
  // Sign-in rate limits key on this; a value sent by the client is never trusted.
  req.headers[CLIENT_ADDRESS_HEADER] = req.socket.remoteAddress ?? "unknown";
}
