import { z } from "zod";
import { alarmStates } from "@/lib/alarms/states";
import { safeText } from "./text";

export const alarmQuerySchema = z.object({
  site: z.string().min(1).max(100).optional(),
  state: z
    .string()
    .optional()
    .transform((v) => (v ? v.split(",") : undefined))
    .pipe(z.array(z.enum(alarmStates)).optional()),
  priority: z.coerce.number().int().min(1).max(4).optional(),
  all: z.enum(["0", "1"]).optional(),
});

export const ackSchema = z.object({ note: safeText(z.string().trim().max(2000)).optional() });
export type AckInput = z.infer<typeof ackSchema>;

export const noteSchema = z.object({
  text: safeText(z.string().trim().min(1, "Write something").max(4000, "At most 4000 characters")),
  visibility: z.enum(["internal", "customer"]),
});
export type NoteInput = z.infer<typeof noteSchema>;

export const shelveSchema = z.object({
  minutes: z
    .number({ error: "Minutes must be a number" })
    .int()
    .min(1, "At least a minute")
    .max(24 * 60, "At most 24 hours"),
  reason: safeText(z.string().trim().min(3, "Give a reason").max(500)),
});
export type ShelveInput = z.infer<typeof shelveSchema>;

export const unshelveSchema = z.object({ note: safeText(z.string().trim().max(2000)).optional() });
