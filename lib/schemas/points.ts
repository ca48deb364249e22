import { z } from "zod";
import { isNumericQuantity, MAX_EXPECTED_INTERVAL_S, unitConverter } from "@/lib/point-list-csv";
import { canonicalUnitOf, isQuantityKey, quantities, type QuantityKey } from "@/lib/quantities";

// Request shapes for points: one at a time under an equipment, or a whole site's point list.

export const equipmentPointsParams = z.object({ equipmentId: z.string().min(1).max(100) });
export const pointParams = z.object({ pointId: z.coerce.number().int().positive() });
export const sitePointListParams = z.object({ siteId: z.string().min(1).max(100) });

const flag = z
  .enum(["1", "0", "true", "false"])
  .optional()
  .transform((v) => v === "1" || v === "true");

/** `?dryRun=1` (or `?preview=1`) answers the plan and changes nothing. */
export const pointListQuery = z.object({ dryRun: flag, preview: flag });
/** Removing a point that has stored readings removes them too; the caller must say so. */
export const deletePointQuery = z.object({ discardHistory: flag });

const interval = z.number().int().min(1).max(MAX_EXPECTED_INTERVAL_S);
const limit = z.number().finite().nullable();
const unit = z.string().trim().min(1).max(16);

export const createPointSchema = z.strictObject({
  quantity: z
    .string()
    .trim()
    .refine(isQuantityKey, { error: (iss) => `unknown quantity "${String(iss.input)}"` }),
  /** The unit the limits are given in; the point stores its quantity's canonical unit. Default: canonical. */
  unit: unit.optional(),
  expectedIntervalS: interval.default(5),
  lowLimit: limit.optional(),
  highLimit: limit.optional(),
});
export type CreatePointBody = z.infer<typeof createPointSchema>;

export const updatePointSchema = z
  .strictObject({
    /** The unit the limits in this request are given in (default canonical). */
    unit: unit.optional(),
    expectedIntervalS: interval.optional(),
    lowLimit: limit.optional(),
    highLimit: limit.optional(),
  })
  .refine((v) => Object.keys(v).some((k) => k !== "unit"), { message: "nothing to change" });
export type UpdatePointBody = z.infer<typeof updatePointSchema>;

export interface FieldIssue {
  path: string;
  message: string;
}

/**
 * A point's limits in canonical units from limits given in `unit` (canonical when absent), or
 * the field issues: a unit that cannot measure the quantity, limits on a non-numeric point,
 * low above high. `current` fills in a limit the request leaves out (an edit).
 */
export function canonicalLimits(
  quantity: QuantityKey,
  input: { unit?: string; lowLimit?: number | null; highLimit?: number | null },
  current: { lowLimit: number | null; highLimit: number | null } = { lowLimit: null, highLimit: null },
): { lowLimit: number | null; highLimit: number | null } | { issues: FieldIssue[] } {
  const issues: FieldIssue[] = [];
  const convert = unitConverter(input.unit ?? canonicalUnitOf(quantity), quantity);
  if (typeof convert === "string") return { issues: [{ path: "unit", message: convert }] };
  const numeric = isNumericQuantity(quantity);
  const read = (field: "lowLimit" | "highLimit") => {
    const v = input[field];
    if (v === undefined) return current[field];
    if (v === null) return null;
    if (!numeric) {
      issues.push({ path: field, message: `${quantity} is ${quantities[quantity].measure}, it takes no limits` });
      return null;
    }
    return convert(v);
  };
  const lowLimit = read("lowLimit");
  const highLimit = read("highLimit");
  if (lowLimit !== null && highLimit !== null && lowLimit > highLimit)
    issues.push({ path: "highLimit", message: "highLimit is below lowLimit" });
  return issues.length ? { issues } : { lowLimit, highLimit };
}
