// What server.ts started, visible to route handlers. Next bundles route code apart from
// server.ts, so the handle lives on globalThis rather than in module state.
export interface RuntimeStatus {
  broker: { mode: "embedded" | "external" | "none"; up: boolean; clients: number };
}

export interface Runtime {
  status(): RuntimeStatus;
}

const g = globalThis as unknown as { __liftlineRuntime?: Runtime };

export function setRuntime(runtime: Runtime | undefined): void {
  g.__liftlineRuntime = runtime;
}

export function getRuntime(): Runtime | undefined {
  return g.__liftlineRuntime;
}
