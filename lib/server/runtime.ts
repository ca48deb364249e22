import { openDb, type Db } from "@/db/client";
import type { GatewayChange } from "@/gateway/index";
import { createSignInLimiter, type SignInLimiter } from "@/lib/auth/sign-in-limiter";
import { AppError } from "@/lib/errors";
import type { AlarmService } from "./alarms/service";
import type { Escalator } from "./alarms/escalation";
import { loadConfig } from "./config";
import { allowedOriginsOf } from "./origin";
import {
  createApiRateLimiter,
  createPasswordResetLimiter,
  type ApiRateLimiter,
  type PasswordResetLimiter,
} from "./rate-limit";
import type { LatestInMemory } from "@/db/queries/readings";
import type { SimulationManager } from "./simulation/manager";
import type { DrillService } from "./drills";
import { createStorageHealth, type StorageHealth } from "./storage-health";
import type { MailDto } from "@/lib/dto/oncall";
import type { NotifyPaths } from "./notify/start";
import type { MailMessage } from "./mail";

// The process's one registry of what is running. Next bundles route handlers apart from
// server.ts, so module state is not shared between them: the registry lives on globalThis,
// and both sides find the same database connection and the same services.

export interface RuntimeStatus {
  broker: { mode: "embedded" | "external" | "none"; up: boolean; clients: number };
}

/** The services startLiftline started (absent in a process that only serves pages, e.g. a test of routes). */
export interface Runtime {
  status(): RuntimeStatus;
  alarms: AlarmService;
  escalator: Escalator;
  /** Whether a site's data is live, stale, offline or has no gateway at all. */
  siteDataStatus(siteId: string): "live" | "stale" | "offline" | "no_gateway";
  /** The newest committed value of a point, held in memory (latest_values is written behind it). */
  latestValue: LatestInMemory;
  /** Demo mode's simulated gateways (absent when LIFTLINE_SIMULATOR=0 or not in demo mode). */
  simulation?: SimulationManager;
  /** Drills on training sites (absent without the embedded broker). */
  drills?: DrillService;
  /** Publishes a command to a gateway's command topic (the simulator's drills). */
  sendGatewayCommand(gatewayId: string, payload: unknown): Promise<void>;
  /** Publishes a prepared command message (a Sparkplug DCMD to a simulated training node). */
  publishCommand?(topic: string, payload: Buffer): void;
  /** Tells the gateway side that a gateway's record changed. */
  gatewayChanged(gatewayId: string, change: GatewayChange): void;
  /** Closes every live socket of a user (disabled, or their role or organization changed); returns how many. */
  disconnectUserSockets(userId: string): number;
  /** Closes the live sockets opened with one session (signed out); returns how many. */
  disconnectSessionSockets(sessionId: string): number;
  /** Sends an e-mail through the server's mail path (SMTP_URL or the local sink). */
  sendMail(message: MailMessage): Promise<void>;
  /** Mail the local SMTP sink took but could not store yet (the database could not be written). */
  heldMail(): MailDto[];
  /** Push and text paths (absent in a process started without the alarm system). */
  notify?: NotifyPaths;
}

/** The push and text paths, or a 503 for a process started without them. */
export function requireNotifyPaths(): NotifyPaths {
  const notify = registry.runtime?.notify;
  if (!notify) throw new AppError("unavailable", "Notifications are not running in this process.");
  return notify;
}

interface Registry {
  db?: Db;
  runtime?: Runtime;
  signInLimiter?: SignInLimiter;
  apiRateLimiter?: ApiRateLimiter;
  allowedOrigins?: ReadonlySet<string>;
  signInAddressDelayMs?: number;
  storage?: StorageHealth;
  passwordResetLimiter?: PasswordResetLimiter;
}

const registry: Registry = ((globalThis as { __liftline?: Registry }).__liftline ??= {});

export function setRuntime(runtime: Runtime | undefined): void {
  registry.runtime = runtime;
}

export function getRuntime(): Runtime | undefined {
  return registry.runtime;
}

/** The running alarm service, or a 503 for a process started without one. */
export function requireAlarmService(): AlarmService {
  const service = registry.runtime?.alarms;
  if (!service) throw new AppError("unavailable", "The alarm service is not running in this process.");
  return service;
}

/** The process-wide database connection (opened on first use by a process that did not set one). */
export function getDb(): Db {
  return (registry.db ??= openDb(process.env.DATABASE_PATH ?? "data/liftline.db"));
}

/** startLiftline and tests make their connection the process-wide one. */
export function setDb(db: Db | undefined): void {
  registry.db = db;
}

/** Failed sign-ins per account and per address, counted across every request of the process. */
export function signInLimiter(): SignInLimiter {
  if (!registry.signInLimiter) {
    const config = loadConfig();
    registry.signInLimiter = createSignInLimiter({
      windowS: config.SIGNIN_WINDOW_S,
      maxPerAccount: config.SIGNIN_MAX_PER_ACCOUNT,
      maxPerAddress: config.SIGNIN_MAX_PER_ADDRESS,
      baseDelayS: config.SIGNIN_BASE_DELAY_S,
    });
  }
  return registry.signInLimiter;
}

/** Writes and trend reads per API token and per signed-in user, counted across the process. */
export function apiRateLimiter(): ApiRateLimiter {
  if (!registry.apiRateLimiter) {
    const config = loadConfig();
    registry.apiRateLimiter = createApiRateLimiter({
      writesPerMin: config.API_WRITES_PER_MIN,
      trendsPerMin: config.API_TRENDS_PER_MIN,
    });
  }
  return registry.apiRateLimiter;
}

/** Password-reset requests per typed address and per client address, counted across the process. */
export function passwordResetLimiter(): PasswordResetLimiter {
  if (!registry.passwordResetLimiter) {
    const config = loadConfig();
    registry.passwordResetLimiter = createPasswordResetLimiter({
      perAccountPerHour: config.PASSWORD_RESET_PER_HOUR_PER_ACCOUNT,
      perAddressPerHour: config.PASSWORD_RESET_PER_HOUR_PER_ADDRESS,
    });
  }
  return registry.passwordResetLimiter;
}

/** The origins browsers may send state-changing requests from (NEXTAUTH_URL's and ALLOWED_ORIGINS). */
export function allowedOrigins(): ReadonlySet<string> {
  return (registry.allowedOrigins ??= allowedOriginsOf(loadConfig()));
}

/** The pause before a sign-in from a slowed address is checked. */
export function signInAddressDelayMs(): number {
  return (registry.signInAddressDelayMs ??= loadConfig().SIGNIN_ADDRESS_DELAY_MS);
}

/** Whether the database can be written, reported by every part that writes (lib/server/storage-health.ts). */
export function storageHealth(): StorageHealth {
  return (registry.storage ??= createStorageHealth());
}

/** startLiftline makes its monitor, with the configured recovery time, the process-wide one. */
export function setStorageHealth(health: StorageHealth): void {
  registry.storage = health;
}
