"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import { Button } from "@/components/ui/button";
import { fetchJson } from "@/lib/client/fetcher";
import { formatDateTime } from "@/lib/client/format";
import type { IncidentDto, IncidentState, IncidentSummaryDto } from "@/lib/dto/incidents";
import {
  composeCustomerSummary,
  parseCustomerSummary,
  type CustomerSummaryParts,
} from "@/lib/incidents/customer-summary";
import { ruleInWords } from "@/lib/incidents/grouping";

const area = "min-h-24 rounded border border-line bg-panel px-3 py-2 text-base";
const label = "text-sm font-semibold";

/** The team's side of an incident: name, state, cause and lesson, and the customer's version with sharing. */
export function IncidentEditor({ incident, draft }: { incident: IncidentDto; draft: CustomerSummaryParts }) {
  const router = useRouter();
  const stored = incident.customerSummary.trim() ? parseCustomerSummary(incident.customerSummary) : draft;
  const [title, setTitle] = useState(incident.title);
  const [state, setState] = useState<IncidentState>(incident.state);
  const [cause, setCause] = useState(incident.cause);
  const [lesson, setLesson] = useState(incident.lesson);
  const [parts, setParts] = useState<CustomerSummaryParts>(stored);
  const [shared, setShared] = useState(incident.sharedWithCustomerAt !== null);
  const [message, setMessage] = useState<{ error: boolean; text: string } | null>(null);
  const [busy, setBusy] = useState(false);

  const save = async () => {
    setBusy(true);
    setMessage(null);
    try {
      await fetchJson(`/api/incidents/${incident.id}`, {
        method: "PATCH",
        body: JSON.stringify({
          ...(title !== incident.title ? { title } : {}),
          state,
          cause,
          lesson,
          customerSummary: composeCustomerSummary(parts),
          shared,
        }),
      });
      setMessage({ error: false, text: "Saved." });
      router.refresh();
    } catch (err) {
      setMessage({ error: true, text: (err as Error).message });
    } finally {
      setBusy(false);
    }
  };

  return (
    <form
      className="flex min-w-0 flex-col gap-3 rounded border border-line bg-panel p-4"
      aria-labelledby="review-form-title"
      onSubmit={(e) => {
        e.preventDefault();
        void save();
      }}
    >
      <h2 id="review-form-title" className="text-lg font-semibold">
        Review
      </h2>
      <label className="flex flex-col gap-1">
        <span className={label}>Name</span>
        <input
          className="min-h-11 rounded border border-line bg-panel px-3 text-base"
          value={title}
          maxLength={200}
          onChange={(e) => setTitle(e.target.value)}
        />
      </label>
      <label className="flex flex-col gap-1">
        <span className={label}>State</span>
        <select
          className="min-h-11 rounded border border-line bg-panel px-3 text-base"
          value={state}
          onChange={(e) => setState(e.target.value as IncidentState)}
        >
          <option value="open">Open</option>
          <option value="resolved">Resolved</option>
          <option value="reviewed">Reviewed</option>
        </select>
      </label>
      <label className="flex flex-col gap-1">
        <span className={label}>Cause (short)</span>
        <textarea className={area} value={cause} maxLength={4000} onChange={(e) => setCause(e.target.value)} />
      </label>
      <label className="flex flex-col gap-1">
        <span className={label}>Lesson</span>
        <textarea className={area} value={lesson} maxLength={4000} onChange={(e) => setLesson(e.target.value)} />
      </label>
      <fieldset className="flex flex-col gap-2 border-t border-line pt-3">
        <legend className="text-base font-semibold">For the customer, in plain words</legend>
        {(
          [
            ["happened", "What happened"],
            ["done", "What was done"],
            ["recommended", "What we recommend"],
          ] as const
        ).map(([key, text]) => (
          <label key={key} className="flex flex-col gap-1">
            <span className={label}>{text}</span>
            <textarea
              className={area}
              value={parts[key]}
              onChange={(e) => setParts((p) => ({ ...p, [key]: e.target.value }))}
            />
          </label>
        ))}
        <label className="flex min-h-11 items-center gap-2">
          <input type="checkbox" className="size-5" checked={shared} onChange={(e) => setShared(e.target.checked)} />
          <span>Shared with the customer (they see this version on their site page)</span>
        </label>
      </fieldset>
      <div className="flex flex-wrap items-center gap-3">
        <Button type="submit" disabled={busy}>
          Save review
        </Button>
        {message ? (
          <p role="status" className={`text-sm ${message.error ? "text-alarm" : "text-muted"}`}>
            {message.text}
          </p>
        ) : null}
      </div>
    </form>
  );
}

/** Merge another incident of the site into this one, or move chosen alarms out into a new one. */
export function IncidentRegroup({ incident, siblings }: { incident: IncidentDto; siblings: IncidentSummaryDto[] }) {
  const router = useRouter();
  const [other, setOther] = useState(siblings[0]?.id ?? "");
  const [chosen, setChosen] = useState<Set<string>>(new Set());
  const [error, setError] = useState<string | null>(null);
  const key = (m: { alarmId: string; activeSinceMs: number }) => `${m.alarmId}@${m.activeSinceMs}`;
  const act = async (path: string, body: unknown, go?: (r: { incident: IncidentDto }) => string) => {
    setError(null);
    try {
      const r = await fetchJson<{ incident: IncidentDto }>(`/api/incidents/${incident.id}/${path}`, {
        method: "POST",
        body: JSON.stringify(body),
      });
      if (go) router.push(go(r));
      else router.refresh();
    } catch (err) {
      setError((err as Error).message);
    }
  };
  return (
    <section
      className="flex min-w-0 flex-col gap-3 rounded border border-line bg-panel p-4"
      aria-labelledby="regroup-title"
    >
      <h2 id="regroup-title" className="text-lg font-semibold">
        Alarms in this incident
      </h2>
      <ul className="flex flex-col gap-1">
        {incident.members.map((m) => (
          <li key={key(m)}>
            <label className="flex min-h-11 items-center gap-2">
              <input
                type="checkbox"
                className="size-5"
                checked={chosen.has(key(m))}
                onChange={(e) =>
                  setChosen((s) => {
                    const next = new Set(s);
                    if (e.target.checked) next.add(key(m));
                    else next.delete(key(m));
                    return next;
                  })
                }
              />
              <span>
                {ruleInWords(m.ruleId)} · {m.equipment} · from {formatDateTime(m.activeSinceMs, incident.siteTimeZone)}
                {m.clearedAtMs === null ? " · still active" : ""}
              </span>
            </label>
          </li>
        ))}
      </ul>
      <div className="flex flex-wrap gap-2">
        <Button
          type="button"
          variant="secondary"
          disabled={chosen.size === 0}
          onClick={() =>
            void act(
              "split",
              {
                activations: incident.members
                  .filter((m) => chosen.has(key(m)))
                  .map((m) => ({ alarmId: m.alarmId, activeSinceMs: m.activeSinceMs })),
              },
              (r) => `/incidents/${r.incident.id}`,
            )
          }
        >
          Move checked alarms to a new incident
        </Button>
      </div>
      {siblings.length ? (
        <div className="flex flex-wrap items-end gap-2">
          <label className="flex w-full min-w-0 flex-col gap-1">
            <span className={label}>Merge another incident of this site into this one</span>
            <select
              className="min-h-11 w-full min-w-0 rounded border border-line bg-panel px-3 text-base"
              value={other}
              onChange={(e) => setOther(e.target.value)}
            >
              {siblings.map((s) => (
                <option key={s.id} value={s.id}>
                  {formatDateTime(s.startedAtMs, s.siteTimeZone)} — {s.title}
                </option>
              ))}
            </select>
          </label>
          <Button type="button" variant="secondary" onClick={() => void act("merge", { otherIncidentId: other })}>
            Merge
          </Button>
        </div>
      ) : null}
      {error ? <p className="text-sm text-alarm">{error}</p> : null}
    </section>
  );
}
