import { z } from "zod";
import { safeText } from "./text";

// Request shapes for sites; shared with the site form.

/** IANA zone names this runtime knows; "UTC" is valid everywhere but missing from some lists. */
export function isKnownTimeZone(name: string): boolean {
  if (name === "UTC") return true;
  try {
    if (typeof Intl.supportedValuesOf === "function" && Intl.supportedValuesOf("timeZone").includes(name)) return true;
    // Links (e.g. "Asia/Calcutta") are not listed but resolve; a bad name throws RangeError.
    return (
      new Intl.DateTimeFormat("en", { timeZone: name }).resolvedOptions().timeZone.length > 0 && name.includes("/")
    );
  } catch {
    return false;
  }
}

const line = (max: number) => safeText(z.string().trim().max(max));

export const siteContactSchema = z.strictObject({
  name: safeText(z.string().trim().min(1, "Enter the contact's name").max(120)),
  role: line(120).default(""),
  phone: line(40).default(""),
  email: z.union([z.literal(""), z.string().trim().max(254).pipe(z.email("Enter a valid e-mail address"))]).default(""),
});
export type SiteContactInput = z.input<typeof siteContactSchema>;

const siteFields = {
  name: safeText(z.string().trim().min(1, "Enter the site's name").max(120)),
  /** Kind of building, free text ("Medical office", "Data hall"). */
  kind: safeText(z.string().trim().min(1, "Enter the kind of building").max(80)),
  address: safeText(z.string().trim().min(1, "Enter the street address").max(300)),
  timeZone: z.string().trim().min(1, "Choose the time zone").max(64).refine(isKnownTimeZone, {
    message: "Not an IANA time zone (e.g. America/Chicago)",
  }),
  contacts: z.array(siteContactSchema).max(20),
  /** After-hours notes: gate code location, plant-room access, who to call. */
  accessNotes: safeText(z.string().max(4000)),
};

export const siteSchema = z.strictObject({
  customerId: z.string().min(1, "Choose the customer").max(100),
  ...siteFields,
  contacts: siteFields.contacts.default([]),
  accessNotes: siteFields.accessNotes.default(""),
});
export type SiteInput = z.input<typeof siteSchema>;
export type SiteBody = z.infer<typeof siteSchema>;

/** An edit names only the fields it changes (no defaults filled in); a site keeps its customer. */
export const sitePatchSchema = z.strictObject(siteFields).partial();
export type SitePatchInput = z.input<typeof sitePatchSchema>;
export type SitePatchBody = z.infer<typeof sitePatchSchema>;
