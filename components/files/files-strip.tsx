"use client";

import { useRef, useState } from "react";
import useSWR from "swr";
import { Button } from "@/components/ui/button";
import { fetchJson } from "@/lib/client/fetcher";
import type { StoredFileDto } from "@/lib/dto/files";
import { MAX_UPLOAD_BYTES } from "@/lib/schemas/files";

/**
 * Photos and PDFs of a site (or of one visit or service request): take a photo with the phone's
 * camera or pick a file, see thumbnails, and — staff only — share a file with the customer.
 */
export function FilesStrip({
  siteId,
  canAct,
  visitId,
  serviceRequestId,
  title = "Photos and files",
}: {
  siteId: string;
  canAct: boolean;
  visitId?: string;
  serviceRequestId?: string;
  title?: string;
}) {
  const query = new URLSearchParams();
  if (visitId) query.set("visitId", visitId);
  if (serviceRequestId) query.set("serviceRequestId", serviceRequestId);
  const listUrl = `/api/sites/${encodeURIComponent(siteId)}/files${query.size ? `?${query}` : ""}`;
  const { data, error, mutate } = useSWR<{ files: StoredFileDto[] }>(listUrl, fetchJson);
  const [caption, setCaption] = useState("");
  const [busy, setBusy] = useState(false);
  const [message, setMessage] = useState<string | null>(null);
  const input = useRef<HTMLInputElement>(null);

  async function send(file: File) {
    setMessage(null);
    // Said before the bytes leave the phone; the server checks again while it reads.
    if (file.size > MAX_UPLOAD_BYTES) {
      setMessage(`The file is larger than ${MAX_UPLOAD_BYTES / (1024 * 1024)} MB. Send a smaller photo or PDF.`);
      return;
    }
    const form = new FormData();
    form.set("file", file);
    if (caption.trim()) form.set("caption", caption.trim());
    if (visitId) form.set("visitId", visitId);
    if (serviceRequestId) form.set("serviceRequestId", serviceRequestId);
    setBusy(true);
    try {
      const res = await fetch(`/api/sites/${encodeURIComponent(siteId)}/files`, { method: "POST", body: form });
      const body = await res.json().catch(() => null);
      if (!res.ok) throw new Error(body?.error?.message ?? `Upload failed (${res.status})`);
      setCaption("");
      await mutate();
    } catch (err) {
      setMessage((err as Error).message);
    } finally {
      setBusy(false);
      if (input.current) input.current.value = "";
    }
  }

  async function setShared(file: StoredFileDto, shared: boolean) {
    setMessage(null);
    try {
      // Shown at once, rolled back if the server refuses: a phone's round trip should not leave the box unchanged.
      await mutate(
        async () => {
          await fetchJson(file.url, { method: "PATCH", body: JSON.stringify({ sharedWithCustomer: shared }) });
          return undefined;
        },
        {
          optimisticData: (current) => ({
            files: (current?.files ?? []).map((f) => (f.id === file.id ? { ...f, sharedWithCustomer: shared } : f)),
          }),
          populateCache: false,
          revalidate: true,
          rollbackOnError: true,
        },
      );
    } catch (err) {
      setMessage((err as Error).message);
    }
  }

  const files = data?.files ?? [];
  const inputId = `file-input-${siteId}-${visitId ?? serviceRequestId ?? "site"}`;
  return (
    <section aria-label={title} className="flex flex-col gap-3">
      <div className="flex flex-col gap-2 sm:flex-row sm:items-end">
        <div className="flex grow flex-col gap-1">
          <label htmlFor={`${inputId}-caption`} className="text-sm font-semibold">
            Caption (optional)
          </label>
          <input
            id={`${inputId}-caption`}
            value={caption}
            maxLength={500}
            onChange={(e) => setCaption(e.target.value)}
            placeholder="e.g. Drive fault screen, CH-2"
            className="min-h-11 rounded border border-line bg-panel px-3 text-base"
          />
        </div>
        <label htmlFor={inputId} className="sr-only">
          Take a photo or choose a file
        </label>
        <input
          ref={input}
          id={inputId}
          type="file"
          accept="image/*,application/pdf"
          capture="environment"
          className="sr-only"
          disabled={busy}
          onChange={(e) => {
            const file = e.target.files?.[0];
            if (file) void send(file);
          }}
        />
        <Button type="button" disabled={busy} onClick={() => input.current?.click()}>
          {busy ? "Uploading…" : "Add photo or PDF"}
        </Button>
      </div>
      {message ? (
        <p role="alert" className="text-sm text-alarm">
          {message}
        </p>
      ) : null}
      {error ? <p className="text-sm text-alarm">Could not load files: {error.message}</p> : null}
      {data && files.length === 0 ? <p className="text-sm text-muted">No photos or files yet.</p> : null}
      <ul className="grid grid-cols-2 gap-3 sm:grid-cols-3 lg:grid-cols-4" data-testid="files-grid">
        {files.map((f) => (
          <li key={f.id} className="flex flex-col gap-1 rounded-lg border border-line bg-panel p-2">
            <a href={f.url} target="_blank" rel="noopener" className="block">
              {f.thumbnailUrl ? (
                <img
                  src={f.thumbnailUrl}
                  alt={f.caption || f.originalName}
                  loading="lazy"
                  className="aspect-[4/3] w-full rounded object-cover"
                />
              ) : (
                <span className="flex aspect-[4/3] w-full items-center justify-center rounded bg-surface text-sm font-semibold">
                  PDF
                </span>
              )}
            </a>
            <p className="truncate text-sm" title={f.caption || f.originalName}>
              {f.caption || f.originalName}
            </p>
            <p className="text-xs text-muted">
              {f.uploadedBy.name} · {new Date(f.createdAt).toLocaleString()}
            </p>
            {canAct ? (
              <label className="flex min-h-11 items-center gap-2 text-sm">
                <input
                  type="checkbox"
                  checked={f.sharedWithCustomer}
                  onChange={(e) => void setShared(f, e.target.checked)}
                />
                Shared with the customer
              </label>
            ) : null}
          </li>
        ))}
      </ul>
    </section>
  );
}
