// Which incident a new alarm activation belongs to, and when an incident is over: pure functions
// of the incident's members, on event time. The rule is stated in lib/rules/README.md ("Incidents").

/** One activation of an alarm: the alarm row and the event time its condition became active. */
export interface ActivationRef {
  alarmId: string;
  activeSinceMs: number;
}

export interface MemberActivation extends ActivationRef {
  ruleId: string;
  equipment: string;
  /** Event time the condition returned to normal; null while it is still active. */
  clearedAtMs: number | null;
}

export interface GroupableIncident {
  id: string;
  startedAtMs: number;
  /** Null while the incident lasts. */
  endedAtMs: number | null;
  members: readonly MemberActivation[];
}

export const groupingRule = {
  /** ISA-18.2 measures alarm floods per 10 minutes, so one flood is one incident. */
  windowS: 600,
  /** A plant restarted after a trip shows within half an hour whether it holds (the power-event hint holds as long). */
  quietS: 1800,
} as const;

/**
 * Root-cause chain: a power event drops the tower fan (or a condenser pump), the head pressure
 * climbs to a trip, and the chiller held off by its timers races the loops toward a crossover.
 * An alarm joins a lasting incident that holds one at its own stage or earlier.
 */
export const causeStage: Readonly<Record<string, number>> = {
  power_event_suspected: 0,
  tower_fan_not_in_auto: 1,
  tower_fan_not_running: 1,
  pump_not_proven: 1,
  barrel_flow_lost: 1,
  head_pressure_near_trip: 2,
  chiller_tripped: 2,
  crossover_risk: 3,
  restart_race: 3,
  loops_crossed: 3,
  drive_temp_toward_trip: 3,
  starts_per_hour: 3,
};

/** Why an activation joins an incident: close in time, or a cause-and-effect link. */
export type JoinReason = "window" | "root_cause";

function joinReason(incident: GroupableIncident, a: { ruleId: string; activeSinceMs: number }): JoinReason | null {
  if (incident.endedAtMs !== null) return null;
  const windowMs = groupingRule.windowS * 1000;
  if (incident.members.some((m) => Math.abs(m.activeSinceMs - a.activeSinceMs) <= windowMs)) return "window";
  const stage = causeStage[a.ruleId];
  if (stage === undefined) return null;
  if (incident.members.some((m) => causeStage[m.ruleId] !== undefined && causeStage[m.ruleId] <= stage))
    return "root_cause";
  return null;
}

/**
 * The lasting incident a new activation joins (the most recently started of those that qualify),
 * or null when it starts a new one.
 */
export function incidentFor(
  incidents: readonly GroupableIncident[],
  activation: { ruleId: string; activeSinceMs: number },
): { incidentId: string; reason: JoinReason } | null {
  let best: { incident: GroupableIncident; reason: JoinReason } | null = null;
  for (const incident of incidents) {
    const reason = joinReason(incident, activation);
    if (reason && (!best || incident.startedAtMs > best.incident.startedAtMs)) best = { incident, reason };
  }
  return best ? { incidentId: best.incident.id, reason: best.reason } : null;
}

/**
 * When the incident ended: every member back to normal and `quietS` of event time since the last
 * return with nothing new. Null while it lasts.
 */
export function incidentEndMs(members: readonly MemberActivation[], nowMs: number): number | null {
  if (!members.length || members.some((m) => m.clearedAtMs === null)) return null;
  const lastClear = Math.max(...members.map((m) => m.clearedAtMs!));
  const lastStart = Math.max(...members.map((m) => m.activeSinceMs));
  const quietFrom = Math.max(lastClear, lastStart);
  return nowMs - quietFrom >= groupingRule.quietS * 1000 ? lastClear : null;
}

/** The root-cause hint an incident's members carry: the earliest stage of the chain among them. */
export function rootHintOf(members: readonly { ruleId: string; activeSinceMs: number }[]): string | null {
  let best: { ruleId: string; stage: number; at: number } | null = null;
  for (const m of members) {
    const stage = causeStage[m.ruleId];
    if (stage === undefined) continue;
    if (!best || stage < best.stage || (stage === best.stage && m.activeSinceMs < best.at))
      best = { ruleId: m.ruleId, stage, at: m.activeSinceMs };
  }
  return best?.ruleId ?? null;
}

const ruleWords: Record<string, string> = {
  power_event_suspected: "Power event",
  tower_fan_not_in_auto: "Tower fan not in auto",
  tower_fan_not_running: "Tower fan not running",
  pump_not_proven: "Pump not proven",
  barrel_flow_lost: "Barrel flow lost",
  head_pressure_near_trip: "Head pressure near trip",
  chiller_tripped: "Chiller trip",
  crossover_risk: "Crossover risk",
  restart_race: "Restart race",
  loops_crossed: "Loops crossed",
  drive_temp_toward_trip: "Drive temperature rising",
  starts_per_hour: "Short cycling",
  comm_lost: "Communication lost",
  efficiency_drift: "Efficiency drift",
  low_evaporator_pressure: "Low evaporator pressure",
};

/** A rule id in words, for titles and the timeline. */
export function ruleInWords(ruleId: string): string {
  return ruleWords[ruleId] ?? ruleId.replaceAll("_", " ");
}

/** An automatic title: the root cause (or the first alarm) and what followed. */
export function automaticTitle(members: readonly { ruleId: string; equipment: string; activeSinceMs: number }[]) {
  if (!members.length) return "Incident";
  const sorted = [...members].sort((a, b) => a.activeSinceMs - b.activeSinceMs);
  const root = rootHintOf(members);
  const lead = sorted.find((m) => m.ruleId === root) ?? sorted[0];
  const worst = sorted.find((m) => m.ruleId === "loops_crossed") ?? sorted.find((m) => m.ruleId === "chiller_tripped");
  const head = `${ruleInWords(lead.ruleId)}${lead.equipment !== "site" ? ` (${lead.equipment})` : ""}`;
  if (worst && worst !== lead) return `${head} → ${ruleInWords(worst.ruleId).toLowerCase()} (${worst.equipment})`;
  const others = new Set(sorted.map((m) => `${m.ruleId}:${m.equipment}`)).size - 1;
  return others > 0 ? `${head} and ${others} related alarm${others === 1 ? "" : "s"}` : head;
}

/** Merging keeps every member of both; the earlier start and the later end (or still lasting). */
export function mergedSpan(
  a: GroupableIncident,
  b: GroupableIncident,
): { startedAtMs: number; endedAtMs: number | null } {
  return {
    startedAtMs: Math.min(a.startedAtMs, b.startedAtMs),
    endedAtMs: a.endedAtMs === null || b.endedAtMs === null ? null : Math.max(a.endedAtMs, b.endedAtMs),
  };
}

/**
 * Splitting moves the chosen activations into a new incident. Both parts must keep at least one
 * member; returns the two member lists or the reason it cannot be done.
 */
export function splitMembers<M extends ActivationRef>(
  members: readonly M[],
  moved: readonly ActivationRef[],
): { kept: M[]; moved: M[] } | { error: string } {
  const isMoved = (m: ActivationRef) =>
    moved.some((x) => x.alarmId === m.alarmId && x.activeSinceMs === m.activeSinceMs);
  const unknown = moved.filter(
    (x) => !members.some((m) => m.alarmId === x.alarmId && m.activeSinceMs === x.activeSinceMs),
  );
  if (unknown.length) return { error: "An activation to move is not in this incident." };
  const out = { kept: members.filter((m) => !isMoved(m)), moved: members.filter(isMoved) };
  if (!out.moved.length) return { error: "Choose at least one alarm to move." };
  if (!out.kept.length) return { error: "At least one alarm must stay in the incident." };
  return out;
}

/** Start and end of a member list (end null while any member is active). */
export function spanOf(members: readonly MemberActivation[]): { startedAtMs: number; lastClearMs: number | null } {
  const startedAtMs = Math.min(...members.map((m) => m.activeSinceMs));
  const lastClearMs = members.some((m) => m.clearedAtMs === null)
    ? null
    : Math.max(...members.map((m) => m.clearedAtMs!));
  return { startedAtMs, lastClearMs };
}
