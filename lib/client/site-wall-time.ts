import { TZDate } from "@date-fns/tz";

// A datetime-local input read and written on the site's wall clock, not the device's: a technician
// picking "02:40" at a plant two time zones away means 02:40 at the plant.

const pad = (n: number) => String(n).padStart(2, "0");

/** `YYYY-MM-DDTHH:mm` of a moment on the site's wall clock. */
export function toSiteWallInput(ms: number, timeZone: string): string {
  const d = new TZDate(ms, timeZone);
  return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}T${pad(d.getHours())}:${pad(d.getMinutes())}`;
}

/** The moment a `YYYY-MM-DDTHH:mm` value names on the site's wall clock; NaN for anything else. */
export function fromSiteWallInput(value: string, timeZone: string): number {
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})$/.exec(value);
  if (!m) return NaN;
  return new TZDate(+m[1], +m[2] - 1, +m[3], +m[4], +m[5], timeZone).getTime();
}
