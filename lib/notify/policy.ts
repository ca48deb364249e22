// Which paths reach people for an alarm of each priority, and when the backup and the admins
// hear of it while nobody acknowledges. Priorities follow ISA-18.2 (1 critical … 4 low).

export const notificationPaths = ["push", "sms", "email"] as const;
export type NotificationPath = (typeof notificationPaths)[number];

export const pathLabel: Record<NotificationPath, string> = {
  push: "Push notification",
  sms: "Text message",
  email: "E-mail",
};

export interface PriorityPolicy {
  priority: number;
  paths: NotificationPath[];
  /** Seconds after the first notification before the backup hears; null never. */
  backupAfterS: number | null;
  /** Seconds after the first notification before every admin hears; null never. */
  adminsAfterS: number | null;
}

export interface DefaultPolicy extends PriorityPolicy {
  /** Why the default is what it is, shown beside it on the admin's page. */
  reason: string;
}

/**
 * The defaults. The crossover race runs about 20 minutes from the first warning (the job's own
 * figure), so a critical alarm must reach a second person while more than half of it is left.
 */
export const defaultPolicies: readonly DefaultPolicy[] = [
  {
    priority: 1,
    paths: ["push", "sms"],
    backupAfterS: 3 * 60,
    adminsAfterS: 6 * 60,
    reason:
      "Critical: a push and a text wake the primary at once (a sleeping person does not wake for e-mail); " +
      "the backup hears after 3 min and the admins after 6, while most of a ~20 min crossover race is still left.",
  },
  {
    priority: 2,
    paths: ["push"],
    backupAfterS: 10 * 60,
    adminsAfterS: null,
    reason:
      "High: a push to the primary; the backup after 10 min. Acting within minutes matters, waking a second person at once does not.",
  },
  {
    priority: 3,
    paths: ["email"],
    backupAfterS: null,
    adminsAfterS: null,
    reason: "Medium: e-mail to the primary, read during the working day; no escalation.",
  },
  {
    priority: 4,
    paths: ["email"],
    backupAfterS: null,
    adminsAfterS: null,
    reason: "Low: e-mail to the primary for the next visit; no escalation.",
  },
];

export function defaultPolicyFor(priority: number): DefaultPolicy {
  return defaultPolicies.find((p) => p.priority === priority) ?? defaultPolicies[defaultPolicies.length - 1];
}

/**
 * Escalation steps now due for one activation: 0 the primary at once, 1 the backup, 2 the admins.
 * `firstSentAtMs` is when step 0 went out (null before); `sent` the steps already done.
 */
export function dueStepsFor(args: {
  policy: PriorityPolicy;
  waitingForAck: boolean;
  firstSentAtMs: number | null;
  sent: ReadonlySet<number>;
  nowMs: number;
}): Array<0 | 1 | 2> {
  const { policy } = args;
  if (!args.waitingForAck || policy.paths.length === 0) return [];
  if (args.firstSentAtMs === null) return args.sent.has(0) ? [] : [0];
  const due: Array<0 | 1 | 2> = [];
  const after: Record<1 | 2, number | null> = { 1: policy.backupAfterS, 2: policy.adminsAfterS };
  for (const step of [1, 2] as const) {
    const s = after[step];
    if (s !== null && !args.sent.has(step) && args.nowMs >= args.firstSentAtMs + s * 1000) due.push(step);
  }
  return due;
}

/** When the next step of an activation falls due (ms), for the escalation timer; null when none will. */
export function nextStepAtMs(policy: PriorityPolicy, firstSentAtMs: number, sent: ReadonlySet<number>): number | null {
  const times = [
    sent.has(1) || policy.backupAfterS === null ? null : firstSentAtMs + policy.backupAfterS * 1000,
    sent.has(2) || policy.adminsAfterS === null ? null : firstSentAtMs + policy.adminsAfterS * 1000,
  ].filter((t): t is number => t !== null);
  return times.length ? Math.min(...times) : null;
}
