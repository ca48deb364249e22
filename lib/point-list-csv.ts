import Papa from "papaparse";
import {
  canonicalUnitOf,
  isQuantityKey,
  pointsByKind,
  quantityFitsKind,
  quantities,
  type EquipmentKind,
  type QuantityKey,
} from "@/lib/quantities";
import { hasUnsafeText } from "@/lib/schemas/text";
import { isWireUnit, toCanonical, unitFits, wireUnitCodes } from "@/lib/units";

// Point-list CSV for a whole site: `equipment_tag, equipment_kind, quantity, unit,
// expected_interval_s, low_limit, high_limit`, one row a point. Limits are given in the row's
// unit and kept in the quantity's canonical SI unit, as readings are. Line numbers count the
// header as line 1; every error names its line and, where it can, its column.

export const POINT_LIST_COLUMNS = [
  "equipment_tag",
  "equipment_kind",
  "quantity",
  "unit",
  "expected_interval_s",
  "low_limit",
  "high_limit",
] as const;
export type PointListColumn = (typeof POINT_LIST_COLUMNS)[number];
export const MAX_POINT_LIST_ROWS = 20_000;
export const MAX_POINT_LIST_BYTES = 2 * 1024 * 1024;
/** A day: slower than that is no live point but a manual entry. */
export const MAX_EXPECTED_INTERVAL_S = 86_400;
export const MAX_EQUIPMENT_TAG = 64;

const EQUIPMENT_KINDS: readonly EquipmentKind[] = Object.keys(pointsByKind) as EquipmentKind[];

export interface PointListError {
  line: number;
  /** The column at fault; null for the whole line (a wrong field count, the header). */
  column: PointListColumn | null;
  message: string;
}

/** One good row, its limits already in the quantity's canonical unit. */
export interface PointListRow {
  line: number;
  equipmentTag: string;
  equipmentKind: EquipmentKind;
  quantity: QuantityKey;
  /** The unit the row gave (its limits were in it). */
  unit: string;
  /** The canonical unit the point stores values in. */
  canonicalUnit: string;
  expectedIntervalS: number;
  lowLimit: number | null;
  highLimit: number | null;
}

const numericMeasures = new Set([
  "temperature",
  "pressure",
  "differential_pressure",
  "flow",
  "power",
  "percent",
  "frequency",
  "duration",
]);

/** Whether a quantity holds numbers (limits make sense) rather than on/off, a state or text. */
export function isNumericQuantity(quantity: QuantityKey): boolean {
  return numericMeasures.has(quantities[quantity].measure);
}

/**
 * A function from a value in `unit` to the quantity's canonical unit, or an error message when
 * the unit cannot measure the quantity. The canonical unit itself is always accepted (for
 * differential pressure "kPa" is the canonical unit even though the wire code for it is "kPad").
 */
export function unitConverter(unit: string, quantity: QuantityKey): ((v: number) => number) | string {
  if (unit === canonicalUnitOf(quantity)) return (v) => v;
  if (!isWireUnit(unit)) return `unknown unit "${unit}" (one of ${wireUnitCodes.join(", ")})`;
  if (!unitFits(unit, quantity))
    return `unit "${unit}" cannot measure ${quantities[quantity].measure} (${quantity}; canonical ${canonicalUnitOf(quantity)})`;
  return (v) => toCanonical(v, unit);
}

/** A number as a person writes it in a CSV cell: blank is "none", anything else must be finite. */
function readNumber(raw: string): number | null | "bad" {
  const s = raw.trim();
  if (s === "") return null;
  // Number("0x10") and Number("1e3") parse; only plain decimals are meant in a point list.
  if (!/^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/.test(s)) return "bad";
  const n = Number(s);
  return Number.isFinite(n) ? n : "bad";
}

function sameHeader(fields: string[]): boolean {
  return fields.length === POINT_LIST_COLUMNS.length && fields.every((f, i) => f.trim() === POINT_LIST_COLUMNS[i]);
}

/**
 * Parses and checks a whole point list. Rows with errors are left out of `rows`; callers apply
 * nothing while `errors` is not empty.
 */
export function parsePointListCsv(text: string): { rows: PointListRow[]; errors: PointListError[] } {
  // Arrays, not header mode: the header is compared as a whole, and the array index stays the
  // file line (blank lines are skipped below, not by papaparse, so they keep their numbers).
  const parsed = Papa.parse<string[]>(text.replace(/^\uFEFF/, ""), { header: false, skipEmptyLines: false });
  const data = parsed.data;
  const header = data[0] ?? [];
  if (!sameHeader(header)) {
    return {
      rows: [],
      errors: [
        {
          line: 1,
          column: null,
          message: `the header must be exactly "${POINT_LIST_COLUMNS.join(", ")}" (found "${header.join(",").slice(0, 200)}")`,
        },
      ],
    };
  }
  if (data.length - 1 > MAX_POINT_LIST_ROWS)
    return { rows: [], errors: [{ line: 1, column: null, message: `more than ${MAX_POINT_LIST_ROWS} rows` }] };

  const errors: PointListError[] = [];
  const erroredRows = new Set<number>();
  for (const e of parsed.errors) {
    if (e.row === undefined || e.row === null) continue;
    errors.push({ line: e.row + 1, column: null, message: e.message });
    erroredRows.add(e.row);
  }

  const rows: PointListRow[] = [];
  const seen = new Map<string, number>();
  const kindOfTag = new Map<string, { kind: string; line: number }>();
  for (let i = 1; i < data.length; i++) {
    const fields = data[i];
    if (fields.every((f) => f.trim() === "")) continue;
    const line = i + 1;
    if (erroredRows.has(i)) continue;
    if (fields.length !== POINT_LIST_COLUMNS.length) {
      errors.push({
        line,
        column: null,
        message: `expected ${POINT_LIST_COLUMNS.length} fields, found ${fields.length}`,
      });
      continue;
    }
    const rowErrors: PointListError[] = [];
    const fail = (column: PointListColumn, message: string) => rowErrors.push({ line, column, message });
    const [tagRaw, kindRaw, quantityRaw, unitRaw, intervalRaw, lowRaw, highRaw] = fields.map((f) => f.trim());

    if (tagRaw === "") fail("equipment_tag", "equipment_tag is empty");
    else if (tagRaw.length > MAX_EQUIPMENT_TAG)
      fail("equipment_tag", `equipment_tag is longer than ${MAX_EQUIPMENT_TAG} characters`);
    else if (hasUnsafeText(tagRaw)) fail("equipment_tag", "equipment_tag contains invisible or broken characters");

    const kindOk = (EQUIPMENT_KINDS as readonly string[]).includes(kindRaw);
    if (!kindOk) fail("equipment_kind", `unknown equipment_kind "${kindRaw}" (one of ${EQUIPMENT_KINDS.join(", ")})`);
    else if (tagRaw !== "") {
      const first = kindOfTag.get(tagRaw);
      if (first && first.kind !== kindRaw)
        fail("equipment_kind", `${tagRaw} is a ${first.kind} on line ${first.line}, not a ${kindRaw}`);
      else if (!first) kindOfTag.set(tagRaw, { kind: kindRaw, line });
    }

    let quantity: QuantityKey | null = null;
    if (!isQuantityKey(quantityRaw)) fail("quantity", `unknown quantity "${quantityRaw}"`);
    else if (kindOk && !quantityFitsKind(kindRaw as EquipmentKind, quantityRaw))
      fail("quantity", `a ${kindRaw} has no ${quantityRaw} point (lib/quantities.ts pointsByKind)`);
    else quantity = quantityRaw;

    let convert: ((v: number) => number) | null = null;
    if (quantity) {
      if (unitRaw === "")
        fail("unit", `unit is empty (the canonical unit of ${quantity} is ${canonicalUnitOf(quantity)})`);
      else {
        const c = unitConverter(unitRaw, quantity);
        if (typeof c === "string") fail("unit", c);
        else convert = c;
      }
    }

    const interval = readNumber(intervalRaw);
    if (interval === null) fail("expected_interval_s", "expected_interval_s is empty");
    else if (interval === "bad" || !Number.isInteger(interval) || interval < 1 || interval > MAX_EXPECTED_INTERVAL_S)
      fail(
        "expected_interval_s",
        `expected_interval_s must be a whole number of seconds from 1 to ${MAX_EXPECTED_INTERVAL_S}`,
      );

    const limits: Record<"low_limit" | "high_limit", number | null> = { low_limit: null, high_limit: null };
    for (const [column, raw] of [
      ["low_limit", lowRaw],
      ["high_limit", highRaw],
    ] as const) {
      const n = readNumber(raw);
      if (n === "bad") fail(column, `${column} "${raw}" is not a number`);
      else if (n !== null && quantity && !isNumericQuantity(quantity))
        fail(column, `${quantity} is ${quantities[quantity].measure}, it takes no limits`);
      else if (n !== null && convert) limits[column] = convert(n);
    }
    if (limits.low_limit !== null && limits.high_limit !== null && limits.low_limit > limits.high_limit)
      fail("high_limit", `high_limit is below low_limit`);

    if (rowErrors.length === 0 && quantity) {
      const key = `${tagRaw}\u0000${quantity}`;
      const first = seen.get(key);
      if (first !== undefined) {
        fail("quantity", `${tagRaw} ${quantity} is already on line ${first}`);
      } else seen.set(key, line);
    }
    if (rowErrors.length > 0) {
      errors.push(...rowErrors);
      continue;
    }
    rows.push({
      line,
      equipmentTag: tagRaw,
      equipmentKind: kindRaw as EquipmentKind,
      quantity: quantity!,
      unit: unitRaw,
      canonicalUnit: canonicalUnitOf(quantity!),
      expectedIntervalS: interval as number,
      lowLimit: limits.low_limit,
      highLimit: limits.high_limit,
    });
  }
  errors.sort((a, b) => a.line - b.line);
  return { rows, errors };
}

/** The point list of a site as CSV, limits in canonical units (what parsePointListCsv reads back). */
export function formatPointListCsv(
  rows: ReadonlyArray<{
    equipmentTag: string;
    equipmentKind: string;
    quantity: string;
    unit: string;
    expectedIntervalS: number;
    lowLimit: number | null;
    highLimit: number | null;
  }>,
): string {
  return Papa.unparse(
    {
      fields: [...POINT_LIST_COLUMNS],
      data: rows.map((r) => [
        r.equipmentTag,
        r.equipmentKind,
        r.quantity,
        r.unit,
        r.expectedIntervalS,
        r.lowLimit ?? "",
        r.highLimit ?? "",
      ]),
    },
    { newline: "\n" },
  );
}

// ---- The plan: what applying a good point list would do to the site's current points ----

export interface ExistingEquipment {
  id: string;
  tag: string;
  kind: string;
  retired: boolean;
}

export interface ExistingPoint {
  id: number;
  equipmentId: string;
  quantity: string;
  unit: string;
  expectedIntervalS: number;
  lowLimit: number | null;
  highLimit: number | null;
}

export interface PointValues {
  unit: string;
  expectedIntervalS: number;
  lowLimit: number | null;
  highLimit: number | null;
}

export interface PlannedPoint {
  line: number;
  equipmentId: string;
  equipmentTag: string;
  quantity: QuantityKey;
  action: "create" | "update" | "unchanged";
  pointId: number | null;
  before: PointValues | null;
  after: PointValues;
}

export interface PointListPlan {
  items: PlannedPoint[];
  counts: { create: number; update: number; unchanged: number };
}

// Limits went through a unit conversion; a difference in the last bits is no change.
function sameNumber(a: number | null, b: number | null): boolean {
  if (a === null || b === null) return a === b;
  return Math.abs(a - b) <= 1e-9 * Math.max(1, Math.abs(a), Math.abs(b));
}

/**
 * Matches good rows to the site's equipment and points: a point the equipment lacks is created,
 * one that differs is updated, the rest are unchanged. Points the list does not name are left
 * alone (removing a point is a separate, deliberate act). Unknown, retired or differently-kinded
 * equipment is an error on its line.
 */
export function planPointList(
  rows: readonly PointListRow[],
  equipment: readonly ExistingEquipment[],
  points: readonly ExistingPoint[],
): { plan: PointListPlan; errors: PointListError[] } {
  const byTag = new Map(equipment.map((e) => [e.tag, e]));
  const pointByKey = new Map(points.map((p) => [`${p.equipmentId}\u0000${p.quantity}`, p]));
  const errors: PointListError[] = [];
  const items: PlannedPoint[] = [];
  const counts = { create: 0, update: 0, unchanged: 0 };
  for (const r of rows) {
    const e = byTag.get(r.equipmentTag);
    if (!e) {
      errors.push({ line: r.line, column: "equipment_tag", message: `no equipment "${r.equipmentTag}" at this site` });
      continue;
    }
    if (e.retired) {
      errors.push({ line: r.line, column: "equipment_tag", message: `${r.equipmentTag} is retired` });
      continue;
    }
    if (e.kind !== r.equipmentKind) {
      errors.push({
        line: r.line,
        column: "equipment_kind",
        message: `${r.equipmentTag} is a ${e.kind} at this site, not a ${r.equipmentKind}`,
      });
      continue;
    }
    const after: PointValues = {
      unit: r.canonicalUnit,
      expectedIntervalS: r.expectedIntervalS,
      lowLimit: r.lowLimit,
      highLimit: r.highLimit,
    };
    const existing = pointByKey.get(`${e.id}\u0000${r.quantity}`);
    const before: PointValues | null = existing
      ? {
          unit: existing.unit,
          expectedIntervalS: existing.expectedIntervalS,
          lowLimit: existing.lowLimit,
          highLimit: existing.highLimit,
        }
      : null;
    let action: PlannedPoint["action"] = "create";
    if (before) {
      const same =
        before.unit === after.unit &&
        before.expectedIntervalS === after.expectedIntervalS &&
        sameNumber(before.lowLimit, after.lowLimit) &&
        sameNumber(before.highLimit, after.highLimit);
      action = same ? "unchanged" : "update";
    }
    counts[action]++;
    items.push({
      line: r.line,
      equipmentId: e.id,
      equipmentTag: e.tag,
      quantity: r.quantity,
      action,
      pointId: existing?.id ?? null,
      before,
      after,
    });
  }
  return { plan: { items, counts }, errors };
}
