import ical from "ical-generator";

// A person's own on-call shifts as an iCalendar feed (RFC 5545), for the phone's calendar app.

export interface CalendarShift {
  id: string;
  startsAt: number;
  endsAt: number;
  role: "primary" | "backup";
  primaryName: string;
  backupName: string | null;
}

export function onCallCalendar(personName: string, shifts: readonly CalendarShift[], publicUrl: string): string {
  const calendar = ical({
    name: `Liftline on call: ${personName}`,
    prodId: { company: "Liftline", product: "on-call" },
  });
  for (const s of shifts) {
    calendar.createEvent({
      id: `${s.id}-${s.role}@liftline`,
      start: new Date(s.startsAt),
      end: new Date(s.endsAt),
      summary: s.role === "primary" ? "On call (primary)" : "On call (backup)",
      description:
        s.role === "primary"
          ? `You are the primary on call.${s.backupName ? ` Backup: ${s.backupName}.` : " No backup on this shift."}`
          : `You are the backup on call. Primary: ${s.primaryName}.`,
      url: publicUrl ? `${publicUrl}/on-call` : undefined,
    });
  }
  return calendar.toString();
}
