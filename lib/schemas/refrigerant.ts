import { z } from "zod";
import { correctableKinds, leakCheckResults, refrigerantEntryKinds } from "@/lib/refrigerant-log";
import { safeText } from "./text";

// One schema for the entry form and the route: a flat object whose rules depend on the kind,
// so the form can show one set of fields and the API document stays readable.

const MAX_KG = 10_000;

export const refrigerantEntrySchema = z
  .object({
    kind: z.enum(refrigerantEntryKinds),
    /** kg. Positive for added, recovered and full charge; signed for a correction. */
    amountKg: z.number({ error: "Amount must be a number" }).min(-MAX_KG).max(MAX_KG, "At most 10,000 kg").optional(),
    cylinder: safeText(z.string().trim().max(80, "At most 80 characters")).optional(),
    reason: safeText(z.string().trim().min(3, "Say why (at least 3 characters)").max(500, "At most 500 characters")),
    result: z.enum(leakCheckResults).optional(),
    correctsId: z.number().int().positive().optional(),
    /** When it happened (ISO 8601 with offset); now when left out. */
    at: z.iso.datetime({ offset: true, error: "A date and time" }).optional(),
    visitId: z.string().trim().min(1).max(100).optional(),
  })
  .superRefine((v, ctx) => {
    const issue = (path: string, message: string) => ctx.addIssue({ code: "custom", path: [path], message });
    if (v.kind === "added" || v.kind === "recovered" || v.kind === "full_charge") {
      if (v.amountKg === undefined) issue("amountKg", "Give the amount");
      else if (!(v.amountKg > 0)) issue("amountKg", "The amount must be more than zero");
    }
    if (v.kind === "leak_check") {
      if (v.result === undefined) issue("result", "Give the leak check's result");
      if (v.amountKg !== undefined) issue("amountKg", "A leak check has no amount");
    } else if (v.result !== undefined) issue("result", "Only a leak check has a result");
    if (v.kind === "correction") {
      if (v.correctsId === undefined) issue("correctsId", "Name the entry this corrects");
      if (v.amountKg === undefined || v.amountKg === 0) issue("amountKg", "Give the signed change, not zero");
    } else if (v.correctsId !== undefined) issue("correctsId", "Only a correction names another entry");
  });
export type RefrigerantEntryInput = z.infer<typeof refrigerantEntrySchema>;

export { correctableKinds };
