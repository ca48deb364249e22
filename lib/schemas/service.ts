import { z } from "zod";
import { safeText } from "./text";

// Request bodies of the service call: customers' service requests, visits with their running log,
// and the temporary changes made on a plant that must be put back.

export const serviceRequestUrgencyValues = ["not_urgent", "today", "now"] as const;
export const serviceRequestStateValues = ["received", "assigned", "on_the_way", "done", "cancelled"] as const;
export const temporaryChangeKindValues = [
  "controller_setting",
  "safety_bypassed",
  "drive_in_hand_or_off",
  "load_shed",
  "valve_by_hand",
  "other",
] as const;

const id = z.string().trim().min(1).max(200);
const isoTime = z.iso.datetime({ offset: true, message: "A date and time with its offset (ISO 8601)" });

export const createServiceRequestSchema = z.object({
  siteId: id,
  description: safeText(z.string().trim().min(3, "Say what you see").max(4000, "At most 4000 characters")),
  urgency: z.enum(serviceRequestUrgencyValues, { error: "Choose not urgent, today or now" }),
  callbackPhone: z
    .string()
    .trim()
    .min(5, "A number we can call back")
    .max(40)
    .regex(/^[+()0-9 .\-x]+$/, "Digits, spaces and + ( ) - . x only"),
});
export type CreateServiceRequestInput = z.infer<typeof createServiceRequestSchema>;

export const updateServiceRequestSchema = z
  .object({
    state: z.enum(serviceRequestStateValues).optional(),
    /** A staff member's user id; "me" assigns the caller. */
    assignTo: id.optional(),
  })
  .refine((v) => v.state !== undefined || v.assignTo !== undefined, { message: "Give a state or someone to assign" });
export type UpdateServiceRequestInput = z.infer<typeof updateServiceRequestSchema>;

export const serviceRequestQuerySchema = z.object({
  site: id.optional(),
  open: z.enum(["0", "1"]).optional(),
});

export const visitQuerySchema = z.object({
  site: id.optional(),
  open: z.enum(["0", "1"]).optional(),
});

export const openVisitSchema = z
  .object({
    /** Planned visits name the site; from an alarm or a request the site comes from it. */
    siteId: id.optional(),
    alarmId: id.optional(),
    serviceRequestId: id.optional(),
    mode: z.enum(["on_site", "remote"]),
  })
  .refine((v) => [v.siteId, v.alarmId, v.serviceRequestId].some((x) => x !== undefined), {
    message: "Name a site, an alarm or a service request",
    path: ["siteId"],
  })
  .refine((v) => !(v.alarmId && v.serviceRequestId), {
    message: "Open from an alarm or from a service request, not both",
    path: ["serviceRequestId"],
  });
export type OpenVisitInput = z.infer<typeof openVisitSchema>;

export const partUsedSchema = z.object({
  part: safeText(z.string().trim().min(1, "Name the part").max(200)),
  quantity: z.number().positive("More than zero").max(10_000),
});

export const updateVisitSchema = z
  .object({
    /** Stamps arrival (or remote start) now. */
    arrive: z.literal(true).optional(),
    /** Stamps departure (or remote end) now. */
    depart: z.literal(true).optional(),
    summary: safeText(z.string().trim().max(8000, "At most 8000 characters")).optional(),
    partsUsed: z.array(partUsedSchema).max(100).optional(),
  })
  .refine((v) => Object.values(v).some((x) => x !== undefined), { message: "Nothing to change" });
export type UpdateVisitInput = z.infer<typeof updateVisitSchema>;

export const visitEntrySchema = z.object({
  text: safeText(z.string().trim().min(1, "Write something").max(2000, "At most 2000 characters")),
  /** A stored file (photo) attached to the entry; uploads are their own endpoint. */
  fileId: id.optional(),
});
export type VisitEntryInput = z.infer<typeof visitEntrySchema>;

export const linkAlarmSchema = z.object({ alarmId: id });

export const closeVisitSchema = z.object({
  summary: safeText(z.string().trim().min(3, "Write what was found and done").max(8000)),
  /** Needed only when temporary changes are still in place: why, and who will put them back. */
  openChangesNote: safeText(z.string().trim().min(3, "Say why they stay in place").max(2000)).optional(),
  openChangesOwnerId: id.optional(),
});
export type CloseVisitInput = z.infer<typeof closeVisitSchema>;

export const temporaryChangeSchema = z.object({
  equipmentId: id.optional(),
  kind: z.enum(temporaryChangeKindValues),
  what: safeText(z.string().trim().min(2, "Say what was changed").max(200)),
  /** A quantity key of lib/quantities.ts when a live point shows the setting (checked on put-back). */
  pointQuantity: z.string().trim().max(100).optional(),
  fromValue: safeText(z.string().trim().min(1, "The value before").max(100)),
  toValue: safeText(z.string().trim().min(1, "The value now").max(100)),
  reason: safeText(z.string().trim().min(3, "Say why").max(1000)),
  putBackDueAt: isoTime,
});
export type TemporaryChangeInput = z.infer<typeof temporaryChangeSchema>;

export const putBackSchema = z.object({
  valueNow: safeText(z.string().trim().min(1, "The value as you left it").max(100)),
});
export type PutBackInput = z.infer<typeof putBackSchema>;

/** Sending a visit's report takes no fields: it goes to the site's contacts that have an e-mail address. */
export const sendVisitReportSchema = z.object({}).strict();
export type SendVisitReportInput = z.infer<typeof sendVisitReportSchema>;
