"use client";

import { useState } from "react";
import useSWR from "swr";
import { Button } from "@/components/ui/button";
import { fetchJson } from "@/lib/client/fetcher";

type Data = { overrides: unknown; effective: unknown; defaults: unknown };
type Issue = { path: string; message: string };

/** Per-site rule settings: the admin edits the overrides as JSON; every field is validated on save. */
export function RuleSettingsEditor({ siteId, canEdit }: { siteId: string; canEdit: boolean }) {
  const url = `/api/sites/${encodeURIComponent(siteId)}/rule-settings`;
  const { data, mutate } = useSWR<Data>(url, fetchJson);
  const [draft, setDraft] = useState<string | null>(null);
  const [issues, setIssues] = useState<Issue[]>([]);
  const [status, setStatus] = useState<string | null>(null);
  const text = draft ?? JSON.stringify(data?.overrides ?? {}, null, 2);

  async function save() {
    setIssues([]);
    setStatus(null);
    let body: unknown;
    try {
      body = JSON.parse(text);
    } catch {
      setIssues([{ path: "", message: "This is not valid JSON." }]);
      return;
    }
    const res = await fetch(url, {
      method: "PUT",
      headers: { "content-type": "application/json" },
      body: JSON.stringify(body),
    });
    const json = await res.json().catch(() => null);
    if (!res.ok) {
      setIssues(json?.error?.details ?? [{ path: "", message: json?.error?.message ?? `Not saved (${res.status})` }]);
      return;
    }
    setDraft(null);
    setStatus("Saved. The site's rules restart their trend windows with the next readings.");
    await mutate();
  }

  return (
    <div className="flex flex-col gap-4">
      <label htmlFor="overrides" className="font-semibold">
        Overrides for this site {canEdit ? "" : "(read-only)"}
      </label>
      <textarea
        id="overrides"
        rows={12}
        spellCheck={false}
        readOnly={!canEdit}
        className="rounded border border-line bg-panel p-3 font-mono text-sm"
        value={text}
        onChange={(e) => setDraft(e.target.value)}
      />
      {issues.length ? (
        <ul role="alert" className="text-sm text-alarm">
          {issues.map((i, n) => (
            <li key={n}>
              {i.path ? <code>{i.path}</code> : null} {i.message}
            </li>
          ))}
        </ul>
      ) : null}
      {status ? <p role="status">{status}</p> : null}
      {canEdit ? (
        <Button onClick={save} className="self-start">
          Save settings
        </Button>
      ) : null}
      <details>
        <summary className="cursor-pointer font-semibold">Effective settings (overrides plus defaults)</summary>
        <pre className="mt-2 overflow-x-auto rounded bg-panel p-3 text-xs">
          {JSON.stringify(data?.effective ?? {}, null, 2)}
        </pre>
      </details>
      <details>
        <summary className="cursor-pointer font-semibold">Documented defaults</summary>
        <pre className="mt-2 overflow-x-auto rounded bg-panel p-3 text-xs">
          {JSON.stringify(data?.defaults ?? {}, null, 2)}
        </pre>
      </details>
    </div>
  );
}
