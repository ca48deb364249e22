// A JSON Schema object as a list of fields: name, type, required, and its limits.

type JsonSchema = {
  type?: string | string[];
  properties?: Record<string, JsonSchema>;
  required?: string[];
  items?: JsonSchema;
  enum?: unknown[];
  anyOf?: JsonSchema[];
  oneOf?: JsonSchema[];
  minimum?: number;
  maximum?: number;
  minLength?: number;
  maxLength?: number;
  pattern?: string;
  format?: string;
  description?: string;
  const?: unknown;
};

function typeOf(s: JsonSchema): string {
  if (s.const !== undefined) return JSON.stringify(s.const);
  if (s.enum) return s.enum.map((v) => JSON.stringify(v)).join(" | ");
  const alternatives = s.anyOf ?? s.oneOf;
  if (alternatives) return alternatives.map(typeOf).join(" | ");
  if (s.type === "array" && s.items) return `${typeOf(s.items)}[]`;
  const t = Array.isArray(s.type) ? s.type.join(" | ") : (s.type ?? "any");
  return s.format ? `${t} (${s.format})` : t;
}

function limitsOf(s: JsonSchema): string {
  const parts: string[] = [];
  if (s.minimum !== undefined) parts.push(`≥ ${s.minimum}`);
  if (s.maximum !== undefined) parts.push(`≤ ${s.maximum}`);
  if (s.minLength !== undefined) parts.push(`at least ${s.minLength} characters`);
  if (s.maxLength !== undefined) parts.push(`at most ${s.maxLength} characters`);
  if (s.pattern) parts.push(`matches ${s.pattern}`);
  return parts.join(", ");
}

export function SchemaFields({ schema }: { schema: JsonSchema }) {
  const variants = schema.oneOf ?? schema.anyOf;
  if (variants && variants.every((v) => v.properties))
    return (
      <div className="space-y-2">
        {variants.map((v, i) => (
          <div key={i}>
            <p className="text-xs text-muted">One of:</p>
            <SchemaFields schema={v} />
          </div>
        ))}
      </div>
    );
  if (!schema.properties) return <p className="font-mono text-xs">{typeOf(schema)}</p>;
  return (
    <ul className="divide-y divide-line text-sm">
      {Object.entries(schema.properties).map(([name, field]) => (
        <li key={name} className="flex flex-wrap gap-x-2 py-1">
          <span className="font-mono">{name}</span>
          <span className="font-mono text-xs text-muted">{typeOf(field)}</span>
          {schema.required?.includes(name) ? <span className="text-xs">required</span> : null}
          {limitsOf(field) ? <span className="text-xs text-muted">{limitsOf(field)}</span> : null}
          {field.description ? <span className="w-full text-xs text-muted">{field.description}</span> : null}
        </li>
      ))}
    </ul>
  );
}

export type { JsonSchema };
