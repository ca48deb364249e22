import Papa from "papaparse";
import { z } from "zod";
import { isQuantityKey, quantities, type QuantityKey } from "@/lib/quantities";
import { safeText } from "@/lib/schemas/text";
import { isWireUnit, unitFits, wireUnitCodes, type WireUnitCode } from "@/lib/units";

// Point-map CSV: `gateway_point,equipment,quantity,unit`, one row per gateway point.
// Parsed with papaparse, each row checked with zod; line numbers count the header as line 1.

export const POINT_MAP_COLUMNS = ["gateway_point", "equipment", "quantity", "unit"] as const;
export const MAX_POINT_MAP_ROWS = 20_000;
export const MAX_POINT_MAP_BYTES = 2 * 1024 * 1024;
/** Longest gateway point name, in the point map and in every message that names one. */
export const MAX_POINT_NAME = 128;

/** One gateway point of a point map, named as its CSV columns. */
export interface PointMapRow {
  gateway_point: string;
  equipment: string;
  quantity: QuantityKey;
  unit: WireUnitCode;
}

/** A parsed row and the file line it came from. */
export interface PointMapLine extends PointMapRow {
  line: number;
}

export interface LineError {
  line: number;
  message: string;
}

const rowSchema = z
  .object({
    gateway_point: safeText(
      z
        .string()
        .trim()
        .min(1, "gateway_point is empty")
        .max(MAX_POINT_NAME, `gateway_point is longer than ${MAX_POINT_NAME} characters`),
    ),
    equipment: safeText(z.string().trim().min(1, "equipment is empty").max(64)),
    quantity: z
      .string()
      .trim()
      .refine(isQuantityKey, { error: (iss) => `unknown quantity "${String(iss.input)}"` }),
    unit: z
      .string()
      .trim()
      .refine(isWireUnit, {
        error: (iss) => `unknown unit "${String(iss.input)}" (one of ${wireUnitCodes.join(", ")})`,
      }),
  })
  .superRefine((row, ctx) => {
    if (isQuantityKey(row.quantity) && isWireUnit(row.unit) && !unitFits(row.unit, row.quantity)) {
      ctx.addIssue({
        code: "custom",
        message: `unit "${row.unit}" cannot measure ${quantities[row.quantity].measure} (${row.quantity})`,
      });
    }
  });

export function parsePointMapCsv(text: string): { rows: PointMapLine[]; errors: LineError[] } {
  const errors: LineError[] = [];
  const parsed = Papa.parse<Record<string, string>>(text.replace(/^\uFEFF/, ""), {
    header: true,
    skipEmptyLines: "greedy",
    transformHeader: (h) => h.trim().toLowerCase(),
  });
  const fields = parsed.meta.fields ?? [];
  const missing = POINT_MAP_COLUMNS.filter((c) => !fields.includes(c));
  if (missing.length)
    return {
      rows: [],
      errors: [
        { line: 1, message: `missing column(s): ${missing.join(", ")}; expected ${POINT_MAP_COLUMNS.join(",")}` },
      ],
    };
  if (parsed.data.length > MAX_POINT_MAP_ROWS)
    return { rows: [], errors: [{ line: 1, message: `more than ${MAX_POINT_MAP_ROWS} rows` }] };

  // papaparse reports the 0-based data row; +2 makes it the file line (header is line 1).
  for (const e of parsed.errors) errors.push({ line: (e.row ?? 0) + 2, message: e.message });
  const erroredRows = new Set(parsed.errors.map((e) => e.row));

  const rows: PointMapLine[] = [];
  const seen = new Map<string, number>();
  parsed.data.forEach((raw, i) => {
    const line = i + 2;
    if (erroredRows.has(i)) return;
    const result = rowSchema.safeParse(raw);
    if (!result.success) {
      errors.push({ line, message: result.error.issues.map((iss) => iss.message).join("; ") });
      return;
    }
    const r = result.data;
    const first = seen.get(r.gateway_point);
    if (first !== undefined) {
      errors.push({ line, message: `gateway_point "${r.gateway_point}" is already mapped on line ${first}` });
      return;
    }
    seen.set(r.gateway_point, line);
    rows.push({
      line,
      gateway_point: r.gateway_point,
      equipment: r.equipment,
      quantity: r.quantity as QuantityKey,
      unit: r.unit as WireUnitCode,
    });
  });
  errors.sort((a, b) => a.line - b.line);
  return { rows, errors };
}
