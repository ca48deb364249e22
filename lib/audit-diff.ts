// A readable before → after of an audit entry: the fields that changed, one line each.

export interface FieldChange {
  field: string;
  before: string;
  after: string;
}

const MAX_VALUE_CHARS = 200;

function show(value: unknown): string {
  if (value === undefined) return "—";
  const text = typeof value === "string" ? value : JSON.stringify(value);
  return text.length > MAX_VALUE_CHARS ? `${text.slice(0, MAX_VALUE_CHARS - 1)}…` : text;
}

const isRecord = (v: unknown): v is Record<string, unknown> => typeof v === "object" && v !== null && !Array.isArray(v);

/**
 * The changed fields of two snapshots, nested objects flattened to dotted paths (`crossoverRisk.warnTimeToCrossoverS`);
 * arrays compare whole. A created record (no before) lists every field of after, a removed one every field of before.
 */
export function auditChanges(before: unknown, after: unknown): FieldChange[] {
  const changes: FieldChange[] = [];
  const walk = (a: unknown, b: unknown, path: string) => {
    if (isRecord(a) || isRecord(b)) {
      const left = isRecord(a) ? a : {};
      const right = isRecord(b) ? b : {};
      for (const key of [...new Set([...Object.keys(left), ...Object.keys(right)])].sort())
        walk(left[key], right[key], path ? `${path}.${key}` : key);
      return;
    }
    if (JSON.stringify(a) !== JSON.stringify(b))
      changes.push({ field: path || "value", before: show(a), after: show(b) });
  };
  walk(before ?? undefined, after ?? undefined, "");
  return changes;
}
