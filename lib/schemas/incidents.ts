import { z } from "zod";
import { safeText } from "./text";

export const incidentStateValues = ["open", "resolved", "reviewed"] as const;

export const incidentQuerySchema = z.object({
  site: z.string().min(1).max(100).optional(),
  state: z.enum(incidentStateValues).optional(),
});

export const incidentPatchSchema = z
  .object({
    title: safeText(z.string().trim().min(1, "Give it a name").max(200, "At most 200 characters")).optional(),
    state: z.enum(incidentStateValues).optional(),
    cause: safeText(z.string().trim().max(4000, "At most 4000 characters")).optional(),
    lesson: safeText(z.string().trim().max(4000, "At most 4000 characters")).optional(),
    customerSummary: safeText(z.string().trim().max(6000, "At most 6000 characters")).optional(),
    /** Share the customer's version with the site's customer (or stop sharing it). */
    shared: z.boolean().optional(),
  })
  .refine((v) => Object.keys(v).length > 0, { message: "Nothing to change" });
export type IncidentPatchInput = z.infer<typeof incidentPatchSchema>;

export const mergeIncidentSchema = z.object({ otherIncidentId: z.string().min(1).max(100) });

export const activationRefSchema = z.object({
  alarmId: z.string().min(1).max(100),
  activeSinceMs: z.number().int(),
});

export const splitIncidentSchema = z.object({
  activations: z.array(activationRefSchema).min(1, "Choose at least one alarm to move").max(500),
  title: safeText(z.string().trim().max(200)).optional(),
});
