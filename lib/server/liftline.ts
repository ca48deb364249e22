import { createServer, type IncomingMessage, type Server, type ServerOptions } from "node:http";
import path from "node:path";
import next from "next";
import { migrateDb, openDb, type Db } from "@/db/client";
import { DEMO_SITES, demoAccounts, seedDemo, SERVICE_ORG } from "@/db/seed/demo";
import { startGatewaySide } from "@/gateway/index";
import { clientAddress, type TrustedProxies } from "@/lib/auth/client-address";
import { CLIENT_ADDRESS_HEADER } from "@/lib/auth/session";
import { systemViewer } from "@/lib/auth/viewer";
import { createRuleFeed } from "./alarms/feed";
import { startAlarmSystem } from "./alarms/start";
import { createBoardAlarmSummary } from "./board/site-status";
import { buildIfNeeded } from "./build";
import { startChangeReminders } from "./change-reminders";
import type { Config } from "./config";
import { createLivePublisher } from "./realtime/live";
import { createRealtimeServer, disconnectSessionSockets, disconnectUserSockets } from "./realtime/server";
import { allowedOrigins, setDb, setRuntime, setStorageHealth } from "./runtime";
import { resolveAuthSecret } from "./secret";
import { applySecurityHeaders, securityHeaders, type SecurityHeaderOptions } from "./security-headers";
import { createSimulationManager, type SimulationManager } from "./simulation/manager";
import { createDrillService, type DrillService } from "./drills";
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
  // What is running, in start order; stopped in reverse by close() or by a failed start, so a
  // start that fails half-way leaves no port open and no connection behind.
  const running: Array<{ name: string; stop: () => unknown }> = [];
  try {
    return await start(
      opts,
      config,
      log,
      (name, stop) => void running.push({ name, stop }),
      () => stopAll(running, log),
    );
  } catch (err) {
    log(
      `Start-up failed; stopping: ${[...running]
        .reverse()
        .map((part) => part.name)
        .join(", ")}`,
    );
    await stopAll(running, log);
    throw err;
  }
}

async function stopAll(running: Array<{ name: string; stop: () => unknown }>, log: (line: string) => void) {
  while (running.length) {
    const part = running.pop()!;
    try {
      await part.stop();
    } catch (err) {
      log(`Stopping ${part.name} failed: ${err instanceof Error ? err.message : err}`);
    }
  }
}

async function start(
  opts: LiftlineOptions,
  config: Config,
  log: (line: string) => void,
  started: (name: string, stop: () => unknown) => void,
  stopEverything: () => Promise<void>,
): Promise<Liftline> {
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
  started("the database", () => {
    setRuntime(undefined);
    setDb(undefined);
    db.$client.close();
  });
  migrateDb(db);
  setDb(db);
  if (config.LIFTLINE_DEMO) seedDemo(db, config.LIFTLINE_DEMO_PASSWORD);
  if (!dev && config.LIFTLINE_BUILD_IF_NEEDED) buildIfNeeded(dir, log);
  const storage = createStorageHealth({ recoveryMs: config.STORAGE_RECOVERY_S * 1000, log });
  setStorageHealth(storage);

  const app = next({ dev, dir, hostname: "localhost", port: config.PORT });
  started("Next", () => app.close?.());
  await app.prepare();
  const handle = app.getRequestHandler();
  const handleUpgrade = app.getUpgradeHandler();

  const origins = allowedOrigins();
  const headerOptions: SecurityHeaderOptions = { dev, https: publicUrl.startsWith("https:"), origins: [...origins] };
  const httpServer = createServer(httpServerOptions(config), (req, res) => {
    stampClientAddress(req, config.TRUSTED_PROXY);
    applySecurityHeaders(req, res, headerOptions);
    void handle(req, res);
  });
  httpServer.on("upgrade", (req, socket, head) => {
    if (req.url?.startsWith("/socket.io/")) return; // socket.io's own listener takes these
    void handleUpgrade(req, socket, head);
  });
  started("the HTTP server", () => closeHttp(httpServer));
  const io = createRealtimeServer(httpServer, {
    db,
    secret: authSecret,
    allowedOrigins: origins,
    recheckMs: config.SOCKET_RECHECK_MS,
  });
  started("socket.io", () => io.close());
  // socket.io answers its polling requests itself, before the handler above; they carry no page.
  const { "content-security-policy": _csp, ...pollingHeaders } = securityHeaders("", headerOptions);
  io.engine.on("headers", (headers: Record<string, string>) => Object.assign(headers, pollingHeaders));

  const boardAlarms = createBoardAlarmSummary(db, systemViewer(SERVICE_ORG.id));
  const live = createLivePublisher({
    io,
    db,
    pushMs: config.LIVE_PUSH_MS,
    watched: (room) => (io.sockets.adapter.rooms.get(room)?.size ?? 0) > 0,
    alarmSummary: (siteId) => boardAlarms.side(siteId),
  });
  started("the live publisher", () => live.stop());

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
  started("the alarm system", () => alarmSystem.close());
  const stopStorageAlarm = startStorageAlarm({ db, health: storage, mailer: alarmSystem.mailer, publicUrl, log });
  started("the storage alarm", stopStorageAlarm);
  const changeReminders = startChangeReminders({
    db,
    mailer: alarmSystem.mailer,
    clock: Date.now,
    publicUrl,
    policy: {
      everyMs: config.CHANGE_REMINDER_EVERY_MIN * 60_000,
      escalateAfter: config.CHANGE_REMINDER_ESCALATE_AFTER,
    },
    tickMs: config.CHANGE_REMINDER_TICK_MS,
    log,
  });
  started("the temporary-change reminders", changeReminders.stop);
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
  started("the gateway side", () => gatewaySide.close());

  // Simulated plants publish through their own gateways, like real ones: demo mode's sites, and the
  // training sites drills run on (these need no demo mode, only the embedded broker).
  let simulation: SimulationManager | undefined;
  let drills: DrillService | undefined;
  const demoRuns = config.LIFTLINE_DEMO && config.LIFTLINE_SIMULATOR;
  if (gatewaySide.mqttPort === null) {
    if (demoRuns) log("Simulated gateways run only with the embedded broker; skipped with MQTT_URL set.");
  } else {
    simulation = await createSimulationManager({
      db,
      demoSites: demoRuns ? DEMO_SITES : [],
      mqttUrl: `mqtt://127.0.0.1:${gatewaySide.mqttPort}`,
      log,
      gatewayChanged: (gatewayId, change) => gatewaySide.gatewayChanged(gatewayId, change),
      onSiteReset: (siteId, pointIds) => {
        gatewaySide.writer.forget(pointIds);
        live.forget(pointIds);
        // A fresh monitor: the old run's readings and alarm states would otherwise mix into the new timeline.
        alarmSystem.service.forget(siteId);
      },
    });
    const sim = simulation;
    started("the simulation", () => sim.close());
    drills = createDrillService({
      db,
      simulation,
      sendJsonCommand: async (gatewayId, payload) => gatewaySide.sendGatewayCommand(gatewayId, payload),
      publishCommand: (topic, payload) => gatewaySide.publishCommand(topic, payload),
      log,
    });
    const d = drills;
    started("the drills", () => d.close());
  }

  setRuntime({
    status: () => ({ broker: { mode: gatewaySide.mode, ...gatewaySide.status() } }),
    alarms: alarmSystem.service,
    escalator: alarmSystem.escalator,
    siteDataStatus: (siteId) => live.dataStatus(siteId),
    latestValue: (pointId) => live.latest(pointId),
    simulation,
    drills,
    sendGatewayCommand: async (gatewayId, payload) => gatewaySide.sendGatewayCommand(gatewayId, payload),
    publishCommand: (topic, payload) => gatewaySide.publishCommand(topic, payload),
    gatewayChanged: (gatewayId, change) => gatewaySide.gatewayChanged(gatewayId, change),
    disconnectUserSockets: (userId) => disconnectUserSockets(io, userId),
    disconnectSessionSockets: (sessionId) => disconnectSessionSockets(io, sessionId),
    sendMail: (message) => alarmSystem.mailer.send(message),
    heldMail: () => alarmSystem.mailer.held(),
    notify: alarmSystem.notify,
  });

  await new Promise<void>((resolve, reject) => {
    httpServer.once("error", (err) =>
      reject(
        new Error(`Could not listen for HTTP on ${config.HOST} port ${config.PORT}: ${err.message}`, { cause: err }),
      ),
    );
    httpServer.listen(config.PORT, config.HOST, () => resolve());
  });
  const address = httpServer.address();
  const httpPort = typeof address === "object" && address ? address.port : config.PORT;

  log(
    `Liftline is running at ${publicUrl} (${dev ? "development" : "production"}; HTTP port ${httpPort}, ${gatewaySide.mqttPort === null ? `MQTT broker ${config.MQTT_URL}` : `MQTT port ${gatewaySide.mqttPort}`})`,
  );
  if (simulation && demoRuns) {
    await simulation.startDefaults();
    log(
      "Simulated plants: two normal days and one power-blip incident (Millbrook High School), each through its own gateway. Set LIFTLINE_SIMULATOR=0 to run without them.",
    );
  }
  if (config.LIFTLINE_DEMO) {
    log(`Demo sign-ins (demo data only; password: ${config.LIFTLINE_DEMO_PASSWORD}):`);
    for (const a of demoAccounts()) log(`  ${a.role.padEnd(10)} ${a.email.padEnd(32)} ${a.organization}`);
  }

  // Stops the simulated gateways, stops taking messages, commits what was accepted, then stops pushing.
  let closing: Promise<void> | undefined;
  return { url: publicUrl, httpPort, mqttPort: gatewaySide.mqttPort, db, close: () => (closing ??= stopEverything()) };
}

/** Closes the HTTP server, whether or not it got to listen. */
function closeHttp(server: Server): Promise<void> {
  return new Promise<void>((resolve) => {
    if (!server.listening) return resolve();
    server.close(() => resolve());
  });
}

/**
 * A connection that sends nothing, or sends its request slowly, is closed after the configured
 * time instead of holding a socket (CWE-400). The timeouts cover receiving a request only: a long
 * trend answer or a socket.io upgrade (taken off the HTTP parser) is not cut short.
 */
function httpServerOptions(config: Config): ServerOptions {
  return {
    headersTimeout: config.HTTP_HEADERS_TIMEOUT_MS,
    requestTimeout: config.HTTP_REQUEST_TIMEOUT_MS,
    keepAliveTimeout: config.HTTP_KEEP_ALIVE_TIMEOUT_MS,
    // Node checks the first two only this often (30 s by default), which would stretch them.
    connectionsCheckingInterval: Math.min(1000, config.HTTP_HEADERS_TIMEOUT_MS),
  };
}

function stampClientAddress(req: IncomingMessage, trust: TrustedProxies) {
  // Sign-in limits key on this; a value sent by the client is overwritten, and X-Forwarded-For
  // counts only as far as it was written by proxies TRUSTED_PROXY names.
  req.headers[CLIENT_ADDRESS_HEADER] = clientAddress(req.socket.remoteAddress, req.headers["x-forwarded-for"], trust);
}
