import { z } from "zod";
import { historyKinds } from "@/lib/equipment-history";

/** The equipment history page's filters, from its URL. */
export const equipmentHistoryQuerySchema = z.object({
  days: z.coerce
    .number()
    .refine((d) => [1, 7, 30, 90].includes(d), "1, 7, 30 or 90 days")
    .default(7),
  kind: z
    .union([z.enum(historyKinds), z.array(z.enum(historyKinds))])
    .optional()
    .transform((k) => (k === undefined ? [] : Array.isArray(k) ? k : [k])),
});
