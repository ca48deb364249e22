import { AppError } from "@/lib/errors";

// What server.ts started, visible to route handlers. Next bundles route code apart from
// server.ts, so the handle lives on globalThis rather than in module state.
export interface RuntimeStatus {
  broker: { mode: "embedded" | "external" | "none"; up: boolean; clients: number };
}

export interface Runtime {
  status(): RuntimeStatus;
  /** Rule checks and alarm commands (absent in a process that runs no alarm service). */
  alarms?: import("./alarms/service").AlarmService;
  /** Whether a site's data is live, stale, offline or has no gateway at all. */
  siteDataStatus?: (siteId: string) => "live" | "stale" | "offline" | "no_gateway";
  /** The newest committed value of a point, held in memory (latest_values is written behind it). */
  latestValue?: import("@/db/queries/readings").LatestInMemory;
  /** Demo mode's simulated gateways (absent when LIFTLINE_SIMULATOR=0 or not in demo mode). */
  simulation?: import("./simulation/manager").SimulationManager;
  /** Publishes a command to a gateway's command topic (the simulator's drills). */
  sendGatewayCommand?: (gatewayId: string, payload: unknown) => Promise<void>;
  /** Sends due alarm e-mails now. */
  escalator?: import("./alarms/escalation").Escalator;
}

/** The running alarm service, or a 503 for a process started without one. */
export function requireAlarmService(): import("./alarms/service").AlarmService {
  const service = getRuntime()?.alarms;
  if (!service) throw new AppError("unavailable", "The alarm service is not running in this process.");
  return service;
}

const g = globalThis as unknown as { __liftlineRuntime?: Runtime };

export function setRuntime(runtime: Runtime | undefined): void {
  g.__liftlineRuntime = runtime;
}

export function getRuntime(): Runtime | undefined {
  return g.__liftlineRuntime;
}
