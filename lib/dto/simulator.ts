/** One simulated gateway's run, as the admin's simulator page shows it. */
export interface SimulatedRunDto {
  gatewayId: string;
  protocol: "json" | "sparkplug";
  scenario: string;
  connected: boolean;
  pass: number;
  simulatedMs: number;
  simulatedS: number;
  durationS: number;
  fractionDone: number;
  published: number;
  running: boolean;
  recentEvents: Array<{ tsMs: number; kind: string; equipment: string | null; message: string }>;
  speed: number;
  startedAt: number;
}

/** A demo site with its simulated gateway and the run on it, if any. */
export interface SimulatedSiteStatus {
  siteId: string;
  siteName: string;
  layout: string;
  gatewayId: string;
  run: SimulatedRunDto | null;
}
