import type { Db } from "@/db/client";
import { alarmForCustomerMail, alarmMailSubscribers } from "@/db/queries/notify";
import { isTrainingSite } from "@/db/queries/drills";
import type { TransitionRecord } from "@/lib/alarms";
import { renderQuantities } from "@/lib/quantity-text";
import type { Mailer } from "../mail";

// Customers who opted in hear, in plain words, when a high or critical alarm starts and ends at
// their own site. The owner's message only: no technicians' notes, no other customer's sites.

export function customerAlarmMail(deps: { db: Db; mailer: Mailer; publicUrl: string; log: (line: string) => void }) {
  return (siteId: string, transitions: readonly TransitionRecord[]) => {
    // A training site is the service company's own simulated plant: no customer hears of it.
    if (isTrainingSite(deps.db, siteId)) return;
    for (const t of transitions) {
      if (t.priority > 2) continue;
      const started = t.cause === "condition_active" && t.from === "normal";
      const ended = t.cause === "condition_cleared";
      if (!started && !ended) continue;
      const alarm = alarmForCustomerMail(deps.db, siteId, t.alarmKey);
      if (!alarm) continue;
      for (const person of alarmMailSubscribers(deps.db, alarm.organizationId)) {
        const subject = started
          ? `${alarm.siteName}: a ${t.priority === 1 ? "critical" : "high-priority"} alarm started`
          : `${alarm.siteName}: an alarm has cleared`;
        const text = [
          `Hello ${person.name},`,
          "",
          started
            ? `Liftline raised an alarm on ${alarm.equipment} at ${alarm.siteName}. ${renderQuantities(alarm.ownerMessage, person.unitSystem)}`.trim()
            : `The alarm on ${alarm.equipment} at ${alarm.siteName} has cleared: the condition is back to normal.`,
          "",
          started ? "Your service company's on-call technician has been told." : "",
          `See it in Liftline: ${deps.publicUrl}/`,
          "",
          "You receive this because you chose it in your Liftline settings; turn it off there.",
        ].join("\n");
        deps.mailer.send({ to: person.email, subject, text }).catch((err: unknown) => {
          deps.log(`[notify] could not e-mail ${person.email}: ${String(err)}`);
        });
      }
    }
  };
}
