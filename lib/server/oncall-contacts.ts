import type { Db } from "@/db/client";
import { admins, allShifts, contactOf } from "@/db/queries/oncall";
import { shiftAt } from "@/lib/oncall/rota";

// Who hears about something that needs a technician now: the on-call primary, then the backup,
// then the admins, the order the alarm escalation follows (lib/server/alarms/escalation.ts).

export interface Contact {
  id: string;
  name: string;
  email: string;
  why: string;
}

/**
 * Level 0: the on-call primary. Level 1: the primary and the backup. Level 2 and up: both and the
 * admins. With nobody on the rota the admins hear at once rather than nobody at all.
 */
export function onCallContacts(db: Db, nowMs: number, level: number): Contact[] {
  const shift = shiftAt(allShifts(db), nowMs);
  const out: Contact[] = [];
  const add = (c: { id: string; name: string; email: string } | null, why: string) => {
    if (c && !out.some((o) => o.email === c.email)) out.push({ ...c, why });
  };
  if (!shift) {
    for (const a of admins(db)) add(a, "an admin: nobody is on the on-call rota");
    return out;
  }
  add(contactOf(db, shift.primaryUserId), "the on-call technician");
  if (level >= 1) {
    if (shift.backupUserId)
      add(contactOf(db, shift.backupUserId), "the on-call backup, because it is still not resolved");
    else for (const a of admins(db)) add(a, "an admin: the shift has no backup");
  }
  if (level >= 2) for (const a of admins(db)) add(a, "an admin, because it is still not resolved");
  return out;
}
