import type { Db } from "@/db/client";
import { overdueChanges, recordReminder } from "@/db/queries/temporary-changes";
import { formatClock, inPlaceFor, CHANGE_CAUTION } from "@/lib/service/changes";
import type { Mailer } from "./mail";
import { onCallContacts } from "./oncall-contacts";

// Reminds the on-call technician of temporary changes past their put-back-by time, again every
// `everyMs` until someone marks them put back; after `escalateAfter` reminders the backup hears
// too, and after one more the admins — the way an unacknowledged alarm escalates.

export interface ChangeReminderPolicy {
  everyMs: number;
  /** Reminders to the primary alone before the backup is added (then the admins). */
  escalateAfter: number;
}

export interface ChangeReminders {
  /** Sends whatever is due now; returns how many e-mails went out. */
  run(): Promise<number>;
}

export function createChangeReminders(deps: {
  db: Db;
  mailer: Pick<Mailer, "send">;
  clock: () => number;
  publicUrl: string;
  policy: ChangeReminderPolicy;
  log: (line: string) => void;
}): ChangeReminders {
  const { db, policy } = deps;
  let running: Promise<number> | null = null;

  async function runOnce(): Promise<number> {
    const nowMs = deps.clock();
    let sent = 0;
    for (const c of overdueChanges(db, nowMs)) {
      if (c.lastRemindedAt !== null && nowMs - c.lastRemindedAt < policy.everyMs) continue;
      const number = c.reminders + 1;
      const level = number <= policy.escalateAfter ? 0 : number === policy.escalateAfter + 1 ? 1 : 2;
      const escalating = level > 0 && c.escalatedAt === null;
      // Count the reminder first: a second pass (or process) must not send the same one again.
      if (!recordReminder(db, c.id, c.reminders, nowMs, escalating)) continue;
      const due = formatClock(c.putBackDueAt, c.siteTimeZone, nowMs);
      const equipmentText = c.equipmentTag ? `${c.equipmentTag} ` : "";
      for (const person of onCallContacts(db, nowMs, level)) {
        const text = [
          `${c.siteName}: a temporary change is still in place, past its put-back-by time (${due}).`,
          "",
          `${equipmentText}${c.what}: ${c.fromValue} → ${c.toValue}`,
          `Why: ${c.reason}`,
          `Made by ${c.madeBy}, in place for ${inPlaceFor(c.madeAt, nowMs)}.`,
          "",
          `Put it back and mark it put back: ${deps.publicUrl}/visits/${c.visitId}`,
          "",
          CHANGE_CAUTION,
          "",
          `Reminder ${number}. You are receiving this as ${person.why}.`,
        ].join("\n");
        try {
          await deps.mailer.send({
            to: person.email,
            subject: `[Liftline] Put back: ${c.siteName} ${equipmentText}${c.what} (reminder ${number})`.slice(0, 180),
            text,
          });
          sent++;
        } catch (err) {
          deps.log(`[reminders] could not e-mail ${person.email}: ${err instanceof Error ? err.message : err}`);
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

/** Runs the reminders on a timer in the running server; returns the stop function. */
export function startChangeReminders(deps: Parameters<typeof createChangeReminders>[0] & { tickMs: number }) {
  const reminders = createChangeReminders(deps);
  const timer = setInterval(() => {
    reminders.run().catch((err: unknown) => deps.log(`[reminders] pass failed (retried next tick): ${String(err)}`));
  }, deps.tickMs);
  timer.unref();
  return { reminders, stop: () => clearInterval(timer) };
}
