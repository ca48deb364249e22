import type { Db } from "@/db/client";
import { getAlarm } from "@/db/queries/alarms";
import {
  deliveriesOf,
  markPushSuccess,
  policyFor,
  pushTargetsFor,
  recordDelivery,
  removeDeadSubscription,
  smsTargetFor,
  type DeliveryRecord,
} from "@/db/queries/notify";
import { admins, alarmsAwaitingAck, allShifts, contactOf, createAckLink } from "@/db/queries/oncall";
import { getViewerById } from "@/db/queries/users";
import { trainingSiteIds } from "@/db/queries/drills";
import { priorityMeanings, type Priority } from "@/lib/alarms";
import type { AlarmWithHistoryDto } from "@/lib/dto/alarms";
import { pushPayload, smsText, type AlarmNotice } from "@/lib/notify/messages";
import { dueStepsFor, nextStepAtMs, type NotificationPath, type PriorityPolicy } from "@/lib/notify/policy";
import { alarmShortCode } from "@/lib/notify/short-code";
import { stepLabel, type EscalationStep } from "@/lib/oncall/escalation";
import { shiftAt } from "@/lib/oncall/rota";
import type { Mailer } from "../mail";
import type { PushSender } from "../notify/push";
import type { SmsSender } from "../notify/sms";

// Reaches whoever is on call for an alarm waiting for acknowledgement, on the paths its priority's
// policy names (push, text, e-mail), then the backup and the admins after the policy's delays,
// until someone acknowledges on any path. Every notification is recorded in alarm_deliveries;
// each push and e-mail carries its own single-use acknowledge link, each text a short code.

export const ACK_LINK_TTL_MS = 4 * 3600_000;

export interface Escalator {
  /** Sends whatever is due now; called on new alarms and on a timer; passes may overlap (nothing is sent twice). */
  run(): Promise<number>;
  /** When the next escalation step falls due (ms), or null: the timer wakes for it. */
  nextDueAtMs(): number | null;
}

export interface EscalatorDeps {
  db: Db;
  mailer: Mailer;
  clock: () => number;
  publicUrl: string;
  log: (line: string) => void;
  push?: PushSender;
  sms?: SmsSender;
  /** The policy of a priority; by default the stored one (escalation_policies) or the built-in default. */
  policy?: (priority: number) => PriorityPolicy;
}

export function createEscalator(deps: EscalatorDeps): Escalator {
  const { db } = deps;
  const policyOf = deps.policy ?? ((priority: number) => policyFor(db, priority));
  /** Notifications being sent now, by `alarm:activation:step:person`: a pass started meanwhile skips them. */
  const inFlight = new Set<string>();
  let nextDue: number | null = null;
  /** Notifications sent whose record could not be saved (a full disk): not sent again on the next pass. */
  const sentUnrecorded = new Set<string>();

  type Recipient = { id: string; name: string; email: string; why: string };
  function recipients(step: EscalationStep, nowMs: number): Recipient[] {
    const shift = shiftAt(allShifts(db), nowMs);
    const asAdmin = (why: string) => admins(db).map((a) => ({ ...a, why }));
    // With nobody on the rota the admins hear about it at once rather than nobody at all.
    if (!shift) return step === 0 ? asAdmin("an admin: nobody is on the on-call rota") : [];
    if (step === 2) return asAdmin("an admin, because nobody acknowledged it yet");
    const userId = step === 0 ? shift.primaryUserId : shift.backupUserId;
    const contact = userId ? contactOf(db, userId) : null;
    if (!contact) return step === 1 ? asAdmin("an admin: the shift has no backup") : [];
    return [{ ...contact, why: step === 0 ? stepLabel[0] : `${stepLabel[1]}, because nobody acknowledged it yet` }];
  }

  function mailText(alarm: AlarmWithHistoryDto, person: Recipient, link: string): string {
    const meaning = priorityMeanings[alarm.priority as Priority];
    return [
      `${alarm.siteName}: ${alarm.detail.technicianMessage}`,
      "",
      `Priority: ${meaning?.label ?? alarm.priority}. ${meaning?.response ?? ""}`,
      ...(alarm.detail.advice.length ? ["", "What to consider:", ...alarm.detail.advice.map((s) => `- ${s}`)] : []),
      ...(alarm.detail.caution ? ["", alarm.detail.caution] : []),
      "",
      `Acknowledge (works once, expires in ${ACK_LINK_TTL_MS / 3600_000} h): ${link}`,
      `Open the alarm: ${deps.publicUrl}/alarms/${alarm.id}`,
      "",
      `You are receiving this as ${person.why}.`,
    ].join("\n");
  }

  /** Sends one person's notifications for one step on every path the policy names; returns the records. */
  async function notify(
    a: { id: string; activations: number },
    alarm: AlarmWithHistoryDto,
    step: EscalationStep,
    person: Recipient,
    paths: readonly NotificationPath[],
    nowMs: number,
  ): Promise<DeliveryRecord[]> {
    const base = { alarmId: a.id, activation: a.activations, step, userId: person.id };
    const notice: AlarmNotice = {
      alarmId: a.id,
      siteName: alarm.siteName,
      equipment: alarm.equipment,
      priority: alarm.priority,
      line: alarm.detail.technicianMessage,
    };
    const jobs: Array<Promise<DeliveryRecord[]>> = [];
    let reachable = false;
    if (paths.includes("push") && deps.push) {
      const targets = pushTargetsFor(db, person.id);
      if (targets.length) reachable = true;
      for (const t of targets) {
        const token = createAckLink(db, a.id, person.id, nowMs + ACK_LINK_TTL_MS);
        const payload = pushPayload(notice, {
          open: `${deps.publicUrl}/alarms/${a.id}`,
          ack: `${deps.publicUrl}/api/ack-links/${token}`,
        });
        jobs.push(
          deps.push(t, payload).then((out) => {
            if (out.ok) {
              markPushSuccess(db, t.id, deps.clock());
              return [
                {
                  ...base,
                  path: "push",
                  target: t.id,
                  status: "sent",
                  detail: `accepted by the push service (${out.status})`,
                  sentAt: nowMs,
                },
              ];
            }
            if (out.gone) removeDeadSubscription(db, t.id);
            return [
              {
                ...base,
                path: "push",
                target: t.id,
                status: "failed",
                detail: out.gone ? `${out.detail}: subscription removed` : out.detail,
                sentAt: nowMs,
              },
            ];
          }),
        );
      }
    }
    if (paths.includes("sms") && deps.sms) {
      const phone = smsTargetFor(db, person.id);
      if (phone) {
        reachable = true;
        const sms = deps.sms;
        jobs.push(
          sms.send(phone, smsText(notice, alarmShortCode(a.id, a.activations))).then((out) => [
            {
              ...base,
              path: "sms",
              target: phone,
              status: out.ok ? "sent" : "failed",
              detail: out.ok ? "accepted by the SMS provider" : out.detail,
              sentAt: nowMs,
            },
          ]),
        );
      }
    }
    // E-mail when the policy says so, and as the fallback for someone no other path reaches.
    if (paths.includes("email") || !reachable) {
      const fallback = !paths.includes("email");
      const token = createAckLink(db, a.id, person.id, nowMs + ACK_LINK_TTL_MS);
      const subject = `[Liftline P${alarm.priority}] ${alarm.siteName}: ${alarm.detail.technicianMessage}`.slice(
        0,
        180,
      );
      jobs.push(
        deps.mailer
          .send({ to: person.email, subject, text: mailText(alarm, person, `${deps.publicUrl}/ack/${token}`) })
          .then(
            () => [
              {
                ...base,
                path: "email",
                target: person.email,
                status: "sent",
                detail: fallback ? `no ${paths.join(" or ")} set up for this person: e-mailed instead` : null,
                sentAt: nowMs,
              },
            ],
            (err: unknown) => {
              deps.log(`[escalation] could not e-mail ${person.email}: ${err instanceof Error ? err.message : err}`);
              return [
                {
                  ...base,
                  path: "email",
                  target: person.email,
                  status: "failed",
                  detail: String(err).slice(0, 200),
                  sentAt: nowMs,
                },
              ];
            },
          ),
      );
    }
    return (await Promise.all(jobs)).flat() as DeliveryRecord[];
  }

  /** One person's notifications for one step: sent, then recorded; the key is held while in flight. */
  async function sendAndRecord(
    key: string,
    a: { id: string; activations: number },
    alarm: AlarmWithHistoryDto,
    step: EscalationStep,
    person: Recipient,
    paths: readonly NotificationPath[],
    nowMs: number,
  ): Promise<number> {
    inFlight.add(key);
    try {
      const records = await notify(a, alarm, step, person, paths, nowMs);
      try {
        for (const r of records) recordDelivery(db, r);
      } catch (err) {
        sentUnrecorded.add(key);
        throw err;
      }
      return records.filter((r) => r.status === "sent").length;
    } finally {
      inFlight.delete(key);
    }
  }

  async function runOnce(): Promise<number> {
    const nowMs = deps.clock();
    let soonest: number | null = null;
    const jobs: Array<Promise<number>> = [];
    // Training sites' alarms are worked by the trainee on screen: no push, text or mail to anyone.
    const training = trainingSiteIds(db);
    // Chosen synchronously and sent concurrently: a critical alarm never waits behind a slow
    // mail server's answers for other alarms, and a key in flight is never sent twice.
    const awaiting = [...alarmsAwaitingAck(db, 4)].sort((x, y) => x.priority - y.priority);
    for (const a of awaiting) {
      if (training.has(a.siteId)) continue;
      const policy = policyOf(a.priority);
      const history = deliveriesOf(db, a.id, a.activations);
      const first = history.filter((n) => n.step === 0).map((n) => n.sentAt);
      const firstSentAtMs = first.length ? Math.min(...first) : null;
      const done = new Set(history.map((n) => n.step));
      const steps = dueStepsFor({ policy, waitingForAck: true, firstSentAtMs, sent: done, nowMs });
      for (const step of steps) {
        for (const person of recipients(step, nowMs)) {
          const key = `${a.id}:${a.activations}:${step}:${person.id}`;
          if (sentUnrecorded.has(key) || inFlight.has(key)) continue;
          const viewer = getViewerById(db, person.id);
          const alarm = viewer ? getAlarm(db, viewer, a.id) : null;
          if (!alarm) continue;
          jobs.push(sendAndRecord(key, a, alarm, step, person, policy.paths, nowMs));
        }
        done.add(step);
      }
      const startedAt = firstSentAtMs ?? (steps.includes(0) ? nowMs : null);
      const next = startedAt === null ? null : nextStepAtMs(policy, startedAt, done);
      if (next !== null && (soonest === null || next < soonest)) soonest = next;
    }
    nextDue = soonest;
    const outcomes = await Promise.allSettled(jobs);
    const failed = outcomes.find((o): o is PromiseRejectedResult => o.status === "rejected");
    if (failed) throw failed.reason;
    return outcomes.reduce((n, o) => n + (o.status === "fulfilled" ? o.value : 0), 0);
  }

  return {
    run: runOnce,
    nextDueAtMs: () => nextDue,
  };
}
