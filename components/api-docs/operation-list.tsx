import { SchemaFields, type JsonSchema } from "./schema-fields";

// The OpenAPI document read as a list of operations grouped by tag, for people; machines read the JSON.

interface Parameter {
  name: string;
  in: string;
  required?: boolean;
  schema: JsonSchema;
}
interface OperationObject {
  tags?: string[];
  summary?: string;
  description?: string;
  parameters?: Parameter[];
  requestBody?: { content: Record<string, { schema: JsonSchema }> };
  responses: Record<string, { description: string }>;
}
export type PathsObject = Record<string, Record<string, OperationObject>>;

const METHODS = ["get", "post", "put", "patch", "delete"];

function anchor(method: string, path: string) {
  return `${method}-${path.replace(/[^a-z0-9]+/gi, "-")}`;
}

export function OperationList({ paths }: { paths: PathsObject }) {
  const byTag = new Map<string, { method: string; path: string; op: OperationObject }[]>();
  for (const [path, item] of Object.entries(paths))
    for (const method of METHODS) {
      const op = item[method];
      if (!op) continue;
      const tag = op.tags?.[0] ?? "Other";
      byTag.set(tag, [...(byTag.get(tag) ?? []), { method, path, op }]);
    }
  const tags = [...byTag.keys()].sort();
  return (
    <div className="space-y-8">
      <nav aria-label="API sections" className="flex flex-wrap gap-2 text-sm">
        {tags.map((t) => (
          <a key={t} href={`#tag-${t}`} className="rounded border border-line px-2 py-1 hover:border-ink">
            {t}
          </a>
        ))}
      </nav>
      {tags.map((tag) => (
        <section key={tag} id={`tag-${tag}`}>
          <h2 className="mb-2 text-lg font-semibold">{tag}</h2>
          <ul className="space-y-3">
            {byTag.get(tag)!.map(({ method, path, op }) => (
              <li key={method + path} id={anchor(method, path)} className="rounded-lg border border-line bg-panel p-3">
                <p className="flex flex-wrap items-baseline gap-2">
                  <span className="w-16 font-mono text-xs font-semibold uppercase">{method}</span>
                  <span className="font-mono text-sm break-all">{path}</span>
                </p>
                <p className="mt-1 text-sm">{op.summary}</p>
                {op.description ? (
                  <p className="mt-1 text-xs whitespace-pre-line text-muted">{op.description}</p>
                ) : null}
                {op.parameters?.length ? (
                  <div className="mt-2">
                    <h3 className="text-xs font-semibold text-muted">Parameters</h3>
                    <ul className="text-sm">
                      {op.parameters.map((p) => (
                        <li key={p.in + p.name}>
                          <span className="font-mono">{p.name}</span>{" "}
                          <span className="text-xs text-muted">
                            in {p.in}
                            {p.required ? ", required" : ""}
                          </span>
                        </li>
                      ))}
                    </ul>
                  </div>
                ) : null}
                {op.requestBody
                  ? Object.entries(op.requestBody.content).map(([type, { schema }]) => (
                      <div key={type} className="mt-2">
                        <h3 className="text-xs font-semibold text-muted">Body ({type})</h3>
                        <SchemaFields schema={schema} />
                      </div>
                    ))
                  : null}
                <div className="mt-2">
                  <h3 className="text-xs font-semibold text-muted">Responses</h3>
                  <ul className="text-sm">
                    {Object.entries(op.responses).map(([status, r]) => (
                      <li key={status}>
                        <span className="font-mono">{status}</span> {r.description}
                      </li>
                    ))}
                  </ul>
                </div>
              </li>
            ))}
          </ul>
        </section>
      ))}
    </div>
  );
}
