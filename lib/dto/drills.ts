import type { DrillScore } from "@/lib/drills/score";

/** A training site as the drill screens list it. */
export interface TrainingSiteDto {
  id: string;
  name: string;
  /** The simulator layout its plant follows. */
  layout: string;
  protocol: "json" | "sparkplug";
  gatewayId: string | null;
}

export interface DrillStepDto {
  id: number;
  atMs: number;
  userName: string | null;
  kind: string;
  detail: { text: string; accepted?: boolean; action?: Record<string, unknown> } & Record<string, unknown>;
  /** The active alarms' advice when the step was taken (null where it was not recorded then). */
  advice: Array<{ equipment: string; title: string; advice: string[] }> | null;
}

export interface DrillDto {
  id: string;
  siteId: string;
  siteName: string;
  siteTimeZone: string;
  traineeId: string;
  traineeName: string;
  startedById: string;
  startedByName: string;
  scenario: string;
  speed: number;
  seed: number;
  hints: boolean;
  state: "running" | "ended";
  outcome: "avoided" | "crossed" | "timed_out" | "stopped" | null;
  startedAtMs: number;
  endedAtMs: number | null;
  score: (DrillScore & { facts?: unknown }) | null;
  scorePct: number | null;
  createdAt: string;
}

export interface DrillWithStepsDto extends DrillDto {
  steps: DrillStepDto[];
}

/** A drill's alarm transitions for the debrief's timeline, event time. */
export interface DrillAlarmEventDto {
  atMs: number;
  equipment: string;
  ruleId: string;
  title: string;
  from: string;
  to: string;
  cause: string;
  actorName: string | null;
  note: string | null;
}

export interface SavedScenarioDto {
  id: string;
  name: string;
  base: string;
  layout: string;
  atMs: number;
  approximated: string[];
  createdAt: string;
}

export interface DrillPersonDto {
  id: string;
  name: string;
  role: "admin" | "technician";
}
