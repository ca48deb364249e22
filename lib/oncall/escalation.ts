// Who is e-mailed when a high-priority alarm waits for acknowledgement:
// step 0 the primary on call at once, step 1 the backup after the delay, step 2 every admin
// after twice the delay. Times are wall-clock (people's time), counted from the first e-mail.

export const escalationSteps = [0, 1, 2] as const;
export type EscalationStep = (typeof escalationSteps)[number];
export const stepLabel: Record<EscalationStep, string> = { 0: "primary on call", 1: "backup on call", 2: "admins" };

export interface EscalationPolicy {
  /** Alarms of this priority or more urgent (lower number) are e-mailed. */
  maxPriority: number;
  delayMs: number;
}

export const defaultEscalationPolicy: EscalationPolicy = { maxPriority: 2, delayMs: 10 * 60_000 };

/**
 * The steps now due for one activation. `firstSentAtMs` is when step 0 went out (null if not yet);
 * `sent` the steps already sent. Only alarms still waiting for acknowledgement escalate.
 */
export function dueSteps(args: {
  priority: number;
  waitingForAck: boolean;
  firstSentAtMs: number | null;
  sent: ReadonlySet<number>;
  nowMs: number;
  policy?: EscalationPolicy;
}): EscalationStep[] {
  const policy = args.policy ?? defaultEscalationPolicy;
  if (!args.waitingForAck || args.priority > policy.maxPriority) return [];
  if (args.firstSentAtMs === null) return args.sent.has(0) ? [] : [0];
  const due: EscalationStep[] = [];
  for (const step of [1, 2] as const) {
    if (!args.sent.has(step) && args.nowMs >= args.firstSentAtMs + step * policy.delayMs) due.push(step);
  }
  return due;
}
