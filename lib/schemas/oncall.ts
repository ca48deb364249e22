import { z } from "zod";

const MAX_SHIFT_MS = 31 * 24 * 3600_000;

export const shiftSchema = z
  .object({
    startsAt: z.iso.datetime({ offset: true, local: true, error: "Give a start date and time" }),
    endsAt: z.iso.datetime({ offset: true, local: true, error: "Give an end date and time" }),
    primaryUserId: z.string().min(1, "Choose who is on call"),
    backupUserId: z
      .string()
      .optional()
      .transform((v) => v || null),
  })
  .refine((s) => Date.parse(s.endsAt) > Date.parse(s.startsAt), {
    message: "The shift must end after it starts",
    path: ["endsAt"],
  })
  .refine((s) => Date.parse(s.endsAt) - Date.parse(s.startsAt) <= MAX_SHIFT_MS, {
    message: "A shift is at most a month",
    path: ["endsAt"],
  })
  .refine((s) => s.backupUserId !== s.primaryUserId, {
    message: "The backup must be someone else",
    path: ["backupUserId"],
  });
export type ShiftInput = z.input<typeof shiftSchema>;
export type ShiftOutput = z.output<typeof shiftSchema>;
