import type { Metadata } from "next";
import { OperationList, type PathsObject } from "@/components/api-docs/operation-list";
import { openApiDocument } from "@/lib/server/openapi";
import { requirePageViewer } from "../../(auth)/auth";

export const metadata: Metadata = { title: "API" };

export default async function ApiDocsPage() {
  await requirePageViewer();
  const doc = openApiDocument();
  return (
    <section>
      <h1 className="text-2xl font-semibold">API</h1>
      <p className="mt-1 mb-4 max-w-prose text-sm text-muted">
        {doc.info.description} Authenticate with an API token from{" "}
        <a className="underline" href="/settings/tokens">
          Settings → API tokens
        </a>{" "}
        as <span className="font-mono">Authorization: Bearer …</span>. The machine-readable document is{" "}
        <a className="underline" href="/api/openapi.json">
          /api/openapi.json
        </a>{" "}
        (OpenAPI {doc.openapi}).
      </p>
      <OperationList paths={doc.paths as unknown as PathsObject} />
    </section>
  );
}
