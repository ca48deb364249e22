import { isQuantityKey, quantities } from "@/lib/quantities";
import type { VisitDto, VisitSnapshot } from "@/lib/dto/service";

// The customer's visit report as words, before any layout: the PDF and the HTML e-mail are both
// drawn from this, so they cannot say different things. Pure.

/** The points whose before/after a customer can follow: the loop temperatures, the refrigerant side, the drive. */
export const REPORT_KEY_QUANTITIES = [
  "chilled_water_leaving_temp",
  "chilled_water_entering_temp",
  "condenser_water_entering_temp",
  "condenser_water_leaving_temp",
  "evaporator_refrigerant_pressure",
  "condenser_refrigerant_pressure",
  "drive_temp",
  "outdoor_air_temp",
] as const;

export interface ReportPhoto {
  fileId: string;
  caption: string;
  originalName: string;
}

export interface VisitReportModel {
  title: string;
  siteName: string;
  siteAddress: string;
  /** The visit's date and times in the site's time zone. */
  when: string;
  technician: string;
  how: string;
  /** The technician's log, oldest first, with times. */
  findings: string[];
  done: string[];
  changes: string[];
  keyNumbers: string[];
  photos: ReportPhoto[];
  closing: string;
}

function formatter(timeZone: string, withDate: boolean) {
  return new Intl.DateTimeFormat("en-US", {
    timeZone,
    ...(withDate ? { dateStyle: "long" as const } : {}),
    timeStyle: "short",
  });
}

function label(quantity: string): string {
  return isQuantityKey(quantity) ? quantities[quantity].label.toLowerCase() : quantity.replaceAll("_", " ");
}

/** "CH-1 chilled water leaving was 12.4 °C when the visit began and 6.9 °C when it ended." */
export function keyNumbersInWords(open: VisitSnapshot | null, close: VisitSnapshot | null): string[] {
  const keyed = (s: VisitSnapshot | null) =>
    new Map(
      (s?.points ?? [])
        .filter((p) => (REPORT_KEY_QUANTITIES as readonly string[]).includes(p.quantity))
        .map((p) => [`${p.equipmentTag}\u0000${p.quantity}`, p]),
    );
  const before = keyed(open);
  const after = keyed(close);
  const order = (k: string) => {
    const [tag, quantity] = k.split("\u0000");
    return `${tag}\u0000${String((REPORT_KEY_QUANTITIES as readonly string[]).indexOf(quantity)).padStart(2, "0")}`;
  };
  const keys = [...new Set([...before.keys(), ...after.keys()])].sort((a, b) => order(a).localeCompare(order(b)));
  return keys.map((k) => {
    const b = before.get(k);
    const a = after.get(k);
    const [tag, quantity] = k.split("\u0000");
    const what = `${tag} ${label(quantity)}`;
    if (b && a) {
      return b.display === a.display
        ? `${what} was ${a.display} when the visit began and when it ended.`
        : `${what} was ${b.display} when the visit began and ${a.display} when it ended.`;
    }
    if (b) return `${what} was ${b.display} when the visit began (no reading when it ended).`;
    return `${what} was ${a!.display} when the visit ended (no reading when it began).`;
  });
}

export function visitReportModel(
  visit: VisitDto,
  site: { name: string; address: string },
  photos: ReportPhoto[],
): VisitReportModel {
  const tz = visit.siteTimeZone;
  const full = formatter(tz, true);
  const time = formatter(tz, false);
  const start = visit.arrivedAt ?? visit.openedAt;
  const end = visit.departedAt ?? visit.closedAt;
  const onSite = visit.mode === "on_site";
  const done = [
    ...(visit.summary ? [visit.summary] : []),
    ...visit.partsUsed.map((p) => `Part used: ${p.part} × ${p.quantity}`),
    ...visit.alarms.map((a) => `Alarm looked after: ${a.equipment} — ${a.title}`),
  ];
  const changes = visit.changes.map((c) =>
    c.putBackAt !== null
      ? `${c.plainText} It was put back on ${full.format(c.putBackAt)}${c.valueNow ? ` (now ${c.valueNow})` : ""}.`
      : `${c.plainText} It is still in place and is due to be put back by ${full.format(c.putBackDueAt)}.`,
  );
  return {
    title: `Service visit report — ${site.name}`,
    siteName: site.name,
    siteAddress: site.address,
    when: `${full.format(start)}${end !== null ? ` to ${time.format(end)}` : " (still open)"}`,
    technician: visit.technician.name,
    how: onSite ? "On site" : "Remotely",
    findings: (visit.entries ?? []).map((e) => `${time.format(e.at)} — ${e.text}`),
    done,
    changes,
    keyNumbers: keyNumbersInWords(visit.openSnapshot, visit.closeSnapshot),
    photos,
    closing:
      visit.changes.some((c) => c.putBackAt === null) && visit.openChangesNote
        ? `Changes still in place: ${visit.openChangesNote}${visit.openChangesOwner ? ` (${visit.openChangesOwner.name} will put them back)` : ""}.`
        : "",
  };
}
