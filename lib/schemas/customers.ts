import { z } from "zod";
import { safeText } from "./text";

// Request shapes for customer organizations; shared with the customer form.

export const customerSchema = z.strictObject({
  name: safeText(z.string().trim().min(1, "Enter the customer's name").max(120)),
});
export type CustomerInput = z.input<typeof customerSchema>;
export type CustomerBody = z.infer<typeof customerSchema>;

export const customerPatchSchema = customerSchema.partial();
export type CustomerPatchInput = z.input<typeof customerPatchSchema>;

/** `?includeRetired=1` (admins): retired rows are hidden by default. */
export const includeRetiredQuery = z.object({
  includeRetired: z
    .enum(["0", "1", "true", "false"])
    .optional()
    .transform((v) => v === "1" || v === "true"),
});
