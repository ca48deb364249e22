import { formatDuration } from "@/lib/units";
import type { LiveCheckDto, ServiceRequestState, TemporaryChangeKind } from "@/lib/dto/service";

// Temporary changes in words: how long one has been in place, what it means for the customer,
// and whether a live reading agrees with the value it should be put back to. Pure.

const DURATION_UNITS: Record<string, number> = {
  s: 1,
  sec: 1,
  secs: 1,
  second: 1,
  seconds: 1,
  m: 60,
  min: 60,
  mins: 60,
  minute: 60,
  minutes: 60,
  h: 3600,
  hr: 3600,
  hrs: 3600,
  hour: 3600,
  hours: 3600,
};

/**
 * A setting typed by a technician ("15 min", "900 s", "0.5 h", "900") as canonical seconds; a
 * bare number is seconds, the unit the controller points carry. null when it is not a duration.
 */
export function parseDurationS(text: string): number | null {
  const m = /^\s*(-?\d+(?:\.\d+)?)\s*([a-z]*)\s*$/i.exec(text);
  if (!m) return null;
  const unit = m[2].toLowerCase();
  const factor = unit === "" ? 1 : DURATION_UNITS[unit];
  return factor === undefined ? null : Number(m[1]) * factor;
}

/** Timer settings read back from a controller are whole seconds; a second either way is the same setting. */
const DURATION_TOLERANCE_S = 1;

/**
 * Compares the value a change should be put back to (`fromValue`) with the latest reading of the
 * point that shows the setting. Only durations are compared: other settings' typed units are ambiguous.
 */
export function checkAgainstReading(
  change: { fromValue: string; toValue: string; putBackAt: number | null },
  reading: { value: number | boolean | string | null; display: string; tsMs: number | null; measure: string },
): LiveCheckDto {
  const base = { reading: reading.display, readingAtMs: reading.tsMs };
  if (typeof reading.value !== "number" || reading.measure !== "duration")
    return { ...base, readingValue: null, matchesPutBack: null, message: `The controller shows ${reading.display}.` };
  const expected = parseDurationS(change.fromValue);
  if (expected === null)
    return {
      ...base,
      readingValue: reading.value,
      matchesPutBack: null,
      message: `The controller shows ${reading.display}; "${change.fromValue}" is not a time Liftline can compare.`,
    };
  const matches = Math.abs(reading.value - expected) <= DURATION_TOLERANCE_S;
  const temporary = parseDurationS(change.toValue);
  const stillTemporary = temporary !== null && Math.abs(reading.value - temporary) <= DURATION_TOLERANCE_S;
  let message: string;
  if (matches) message = `The controller shows ${reading.display}, the value before the change.`;
  else if (change.putBackAt !== null)
    message = `Marked put back, but the controller shows ${reading.display}, not ${change.fromValue}${stillTemporary ? " (still the temporary value)" : ""}.`;
  else message = `The controller shows ${reading.display}; it goes back to ${change.fromValue}.`;
  return { ...base, readingValue: reading.value, matchesPutBack: matches, message };
}

/** "1 h 20 min": how long a change has been in place. */
export function inPlaceFor(madeAtMs: number, nowMs: number): string {
  const min = Math.max(0, Math.round((nowMs - madeAtMs) / 60_000));
  if (min < 60) return formatDuration((nowMs - madeAtMs) / 1000);
  return min % 60 ? `${Math.floor(min / 60)} h ${min % 60} min` : `${min / 60} h`;
}

/** "4:00 PM", or "Dec 2, 4:00 PM" when not today, in the site's zone. */
export function formatClock(atMs: number, timeZone: string, nowMs: number): string {
  const day = (ms: number) => new Date(ms).toLocaleDateString("en-US", { timeZone });
  const time = new Date(atMs).toLocaleTimeString("en-US", { timeZone, hour: "numeric", minute: "2-digit" });
  if (day(atMs) === day(nowMs)) return time;
  const date = new Date(atMs).toLocaleDateString("en-US", { timeZone, month: "short", day: "numeric" });
  return `${date}, ${time}`;
}

export interface PlainChangeInput {
  kind: TemporaryChangeKind;
  what: string;
  pointQuantity: string | null;
  fromValue: string;
  toValue: string;
  reason: string;
  equipmentName: string | null;
  putBackDueAt: number;
  putBackAt: number | null;
}

const isTimer = (c: Pick<PlainChangeInput, "what" | "pointQuantity">) =>
  /timer_setting$/.test(c.pointQuantity ?? "") || /timer|anti-?recycle|restart/i.test(c.what);

/** One sentence a building owner can read, without trade terms. */
export function plainChangeSentence(c: PlainChangeInput, timeZone: string, nowMs: number): string {
  const on = c.equipmentName ? `${c.equipmentName}'s` : "the plant's";
  let action: string;
  if (c.kind === "controller_setting" && isTimer(c)) {
    const from = parseDurationS(c.fromValue);
    const to = parseDurationS(c.toValue);
    const direction = from !== null && to !== null && from !== to ? (to < from ? "shorter" : "longer") : "differently";
    action = `set ${on} restart timer ${direction}`;
  } else if (c.kind === "controller_setting") action = `changed a setting on ${on} controls (${c.what})`;
  else if (c.kind === "safety_bypassed") action = `temporarily bypassed a protection on ${on} equipment (${c.what})`;
  else if (c.kind === "drive_in_hand_or_off") action = `switched ${on} ${c.what} to manual (${c.toValue})`;
  else if (c.kind === "load_shed") action = `turned off some air handling (${c.what}) to take load off the plant`;
  else if (c.kind === "valve_by_hand") action = `set a valve by hand (${c.what})`;
  else action = `made a temporary change (${c.what})`;
  const why = c.reason.replace(/\.+$/, "");
  const reasonClause = /^to\s/i.test(why) ? ` ${why}` : ` to get the plant going (${why})`;
  if (c.putBackAt !== null)
    return `A technician ${action}${reasonClause}; it was put back at ${formatClock(c.putBackAt, timeZone, nowMs)}.`;
  const due = formatClock(c.putBackDueAt, timeZone, nowMs);
  const late = c.putBackDueAt < nowMs ? " and is overdue to be set back" : "";
  return `A technician has ${action}${reasonClause}; it will be set back by ${due}${late}.`;
}

/** A service request's state as the customer reads it. */
export function serviceRequestStateText(state: ServiceRequestState, assigneeName: string | null): string {
  switch (state) {
    case "received":
      return "We have received your request and told the technician on call.";
    case "assigned":
      return assigneeName ? `${assigneeName} is looking after your request.` : "A technician has taken your request.";
    case "on_the_way":
      return assigneeName ? `${assigneeName} is on the way.` : "A technician is on the way.";
    case "done":
      return "Done: the technician has finished.";
    case "cancelled":
      return "Cancelled.";
  }
}

/** The caution shown wherever a timer, safety or interlock is changed. */
export const CHANGE_CAUTION =
  "Change timers, safeties and interlocks only within the manufacturer's limits, with someone watching the plant, and put them back afterwards. The manufacturer's procedures, local codes and licensed practice come first.";
