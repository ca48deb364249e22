import type { Db } from "@/db/client";
import { getAlarm } from "@/db/queries/alarms";
import {
  admins,
  alarmsAwaitingAck,
  allShifts,
  contactOf,
  createAckLink,
  notificationsFor,
  recordNotification,
} from "@/db/queries/oncall";
import { getViewerById } from "@/db/queries/users";
import { dueSteps, stepLabel, type EscalationPolicy, type EscalationStep } from "@/lib/oncall/escalation";
import { shiftAt } from "@/lib/oncall/rota";
import { priorityMeanings, type Priority } from "@/lib/alarms";
import type { Mailer } from "../mail";

// E-mails high-priority alarms to whoever is on call, then the backup, then the admins,
// until someone acknowledges. Each e-mail carries its own single-use acknowledge link.

export const ACK_LINK_TTL_MS = 4 * 3600_000;

export interface Escalator {
  /** Sends whatever is due now; called on new alarms and on a timer. */
  run(): Promise<number>;
}

export function createEscalator(deps: {
  db: Db;
  mailer: Mailer;
  clock: () => number;
  publicUrl: string;
  policy: EscalationPolicy;
  log: (line: string) => void;
}): Escalator {
  const { db } = deps;
  let running: Promise<number> | null = null;
  /** E-mails sent whose record could not be saved (a full disk): not sent again on the next pass. */
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

  async function runOnce(): Promise<number> {
    const nowMs = deps.clock();
    let sent = 0;
    for (const a of alarmsAwaitingAck(db, deps.policy.maxPriority)) {
      const history = notificationsFor(db, a.id, a.activations);
      const first = history.filter((n) => n.step === 0).map((n) => n.sentAt);
      const steps = dueSteps({
        priority: a.priority,
        waitingForAck: true,
        firstSentAtMs: first.length ? Math.min(...first) : null,
        sent: new Set(history.map((n) => n.step)),
        nowMs,
        policy: deps.policy,
      });
      for (const step of steps) {
        for (const person of recipients(step, nowMs)) {
          const sentKey = `${a.id}:${a.activations}:${step}:${person.id}`;
          if (sentUnrecorded.has(sentKey)) continue;
          const viewer = getViewerById(db, person.id);
          const alarm = viewer ? getAlarm(db, viewer, a.id) : null;
          if (!alarm) continue;
          const token = createAckLink(db, a.id, person.id, nowMs + ACK_LINK_TTL_MS);
          const link = `${deps.publicUrl}/ack/${token}`;
          const meaning = priorityMeanings[alarm.priority as Priority];
          const text = [
            `${alarm.siteName}: ${alarm.detail.technicianMessage}`,
            "",
            `Priority: ${meaning?.label ?? alarm.priority}. ${meaning?.response ?? ""}`,
            ...(alarm.detail.advice.length
              ? ["", "What to consider:", ...alarm.detail.advice.map((s) => `- ${s}`)]
              : []),
            ...(alarm.detail.caution ? ["", alarm.detail.caution] : []),
            "",
            `Acknowledge (works once, expires in ${ACK_LINK_TTL_MS / 3600_000} h): ${link}`,
            `Open the alarm: ${deps.publicUrl}/alarms/${a.id}`,
            "",
            `You are receiving this as ${person.why}.`,
          ].join("\n");
          try {
            await deps.mailer.send({
              to: person.email,
              subject: `[Liftline P${alarm.priority}] ${alarm.siteName}: ${alarm.detail.technicianMessage}`.slice(
                0,
                180,
              ),
              text,
            });
          } catch (err) {
            deps.log(`[escalation] could not e-mail ${person.email}: ${err instanceof Error ? err.message : err}`);
            continue;
          }
          sent++;
          try {
            recordNotification(db, {
              alarmId: a.id,
              activation: a.activations,
              step,
              userId: person.id,
              email: person.email,
              sentAt: nowMs,
            });
          } catch (err) {
            sentUnrecorded.add(sentKey);
            throw err;
          }
        }
      }
    }
    return sent;
  }

  return {
    run() {
      // One pass at a time: a slow SMTP server must not make two passes send twice.
      running ??= runOnce().finally(() => {
        running = null;
      });
      return running;
    },
  };
}
