"use client";

import { useState } from "react";
import useSWR from "swr";
import { auditChanges } from "@/lib/audit-diff";
import type { AuditEntryDto } from "@/lib/dto/audit";
import { auditEntityTypes } from "@/lib/schemas/audit";
import { fetchJson } from "@/lib/client/fetcher";
import { Button } from "@/components/ui/button";

const select = "min-h-11 rounded border border-line bg-panel px-2 text-base";
const PAGE = 50;

interface Option {
  id: string;
  name: string;
}

/** A date input's day, from local midnight; `to` is exclusive, so the chosen day counts whole. */
const dayStart = (day: string, plusDays = 0) => {
  const [y, m, d] = day.split("-").map(Number);
  return new Date(y, m - 1, d + plusDays).getTime();
};

export function AuditLog({ sites, people }: { sites: Option[]; people: Option[] }) {
  const [entityType, setEntityType] = useState("");
  const [siteId, setSiteId] = useState("");
  const [actorId, setActorId] = useState("");
  const [from, setFrom] = useState("");
  const [to, setTo] = useState("");
  // Older pages by cursor; the stack lets "Newer" step back.
  const [cursors, setCursors] = useState<number[]>([]);
  const before = cursors[cursors.length - 1];
  const query = new URLSearchParams({
    limit: String(PAGE),
    ...(entityType && { entityType }),
    ...(siteId && { siteId }),
    ...(actorId && { actorId }),
    ...(from && { from: String(dayStart(from)) }),
    ...(to && { to: String(dayStart(to, 1)) }),
    ...(before !== undefined && { before: String(before) }),
  });
  const { data, error } = useSWR<{ entries: AuditEntryDto[]; nextBefore: number | null }>(
    `/api/audit?${query}`,
    fetchJson,
  );
  const filter =
    <T,>(set: (v: T) => void) =>
    (v: T) => {
      set(v);
      setCursors([]);
    };

  return (
    <div className="flex flex-col gap-3">
      <div className="flex flex-wrap gap-3" role="group" aria-label="Filters">
        <label className="flex flex-col gap-1 text-sm font-semibold">
          What
          <select className={select} value={entityType} onChange={(e) => filter(setEntityType)(e.target.value)}>
            <option value="">Everything</option>
            {auditEntityTypes.map((t) => (
              <option key={t} value={t}>
                {t.replace("_", " ")}
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col gap-1 text-sm font-semibold">
          Site
          <select className={select} value={siteId} onChange={(e) => filter(setSiteId)(e.target.value)}>
            <option value="">Any site</option>
            {sites.map((s) => (
              <option key={s.id} value={s.id}>
                {s.name}
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col gap-1 text-sm font-semibold">
          By
          <select className={select} value={actorId} onChange={(e) => filter(setActorId)(e.target.value)}>
            <option value="">Anyone</option>
            {people.map((p) => (
              <option key={p.id} value={p.id}>
                {p.name}
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col gap-1 text-sm font-semibold">
          From
          <input type="date" className={select} value={from} onChange={(e) => filter(setFrom)(e.target.value)} />
        </label>
        <label className="flex flex-col gap-1 text-sm font-semibold">
          To
          <input type="date" className={select} value={to} onChange={(e) => filter(setTo)(e.target.value)} />
        </label>
      </div>
      {error ? <p className="text-alarm">{error.message}</p> : null}
      <ol className="flex flex-col gap-2" data-testid="audit-entries">
        {(data?.entries ?? []).map((e) => {
          const changes = auditChanges(e.before, e.after);
          return (
            <li key={e.id} className="rounded-lg border border-line bg-panel px-4 py-3">
              <p className="text-sm text-muted">
                {new Date(e.at).toLocaleString()} · {e.actorName} · {e.entityType.replace("_", " ")} · {e.action}
              </p>
              <p className="font-semibold">{e.summary}</p>
              {changes.length > 0 ? (
                <dl className="mt-1 grid grid-cols-[auto_1fr] gap-x-3 text-sm">
                  {changes.map((c) => (
                    <div key={c.field} className="contents">
                      <dt className="text-muted">{c.field}</dt>
                      <dd className="break-all">
                        <del className="text-muted">{c.before}</del> → <ins className="no-underline">{c.after}</ins>
                      </dd>
                    </div>
                  ))}
                </dl>
              ) : null}
            </li>
          );
        })}
        {data && data.entries.length === 0 ? <li className="text-muted">No entries match.</li> : null}
      </ol>
      <div className="flex gap-3">
        <Button variant="secondary" disabled={cursors.length === 0} onClick={() => setCursors(cursors.slice(0, -1))}>
          Newer
        </Button>
        <Button
          variant="secondary"
          disabled={!data?.nextBefore}
          onClick={() => data?.nextBefore && setCursors([...cursors, data.nextBefore])}
        >
          Older
        </Button>
      </div>
    </div>
  );
}
