"use client";

import Link from "next/link";
import { useState, type FormEvent } from "react";
import useSWR from "swr";
import { Button } from "@/components/ui/button";
import { fetchJson } from "@/lib/client/fetcher";
import type { TemporaryChangeDto, VisitDto } from "@/lib/dto/service";
import { useNow } from "./use-now";
import { VisitReportPanel } from "./visit-report-panel";
import { CHANGE_CAUTION, formatClock, inPlaceFor } from "@/lib/service/changes";

type EquipmentOption = { id: string; tag: string; name: string; kind: string };
type Person = { id: string; name: string };

const post = (url: string, body: unknown) => fetchJson(url, { method: "POST", body: JSON.stringify(body) });
const input = "min-h-11 w-full rounded border border-line bg-panel px-3 text-base";
const kindLabels: Record<TemporaryChangeDto["kind"], string> = {
  controller_setting: "Controller setting",
  safety_bypassed: "Safety or interlock bypassed",
  drive_in_hand_or_off: "Drive in hand or off",
  load_shed: "Air handlers shed",
  valve_by_hand: "Valve set by hand",
  other: "Other",
};
const settingPoints = [
  { quantity: "start_to_start_timer_setting", label: "Start-to-start timer (anti-recycle)" },
  { quantity: "stop_to_start_timer_setting", label: "Stop-to-start timer (anti-recycle)" },
];
const ackable = new Set(["unacknowledged", "returned_unacknowledged", "latched"]);

/** A datetime-local value (the phone's own time) for a moment. */
function localInput(ms: number): string {
  const d = new Date(ms - new Date(ms).getTimezoneOffset() * 60_000);
  return d.toISOString().slice(0, 16);
}

/** The visit as a technician works it from a phone: times, alarms, changes, the log and closing. */
export function VisitView({
  initial,
  staff,
  equipment,
  people,
}: {
  initial: VisitDto;
  staff: boolean;
  equipment: EquipmentOption[];
  people: Person[];
}) {
  const { data, mutate } = useSWR<{ visit: VisitDto }>(`/api/visits/${initial.id}`, fetchJson, {
    fallbackData: { visit: initial },
  });
  const visit = data?.visit ?? initial;
  const [error, setError] = useState<string | null>(null);
  const tz = visit.siteTimeZone;
  const now = useNow();
  const open = visit.closedAt === null;
  const at = (ms: number | null) => (ms === null ? "—" : formatClock(ms, tz, now));
  const run = async (fn: () => Promise<unknown>) => {
    setError(null);
    try {
      await fn();
      await mutate();
      return true;
    } catch (err) {
      setError((err as Error).message);
      return false;
    }
  };
  const inPlace = visit.changes.filter((c) => c.putBackAt === null);
  const remote = visit.mode === "remote";

  return (
    <article className={`flex flex-col gap-6 ${staff && open ? "pb-28" : ""}`}>
      <header>
        <p className="text-sm">
          <Link href={`/sites/${visit.siteId}`} className="underline">
            {visit.siteName}
          </Link>
        </p>
        <h1 className="text-2xl font-semibold">
          {remote ? "Remote visit" : "Visit"} · {visit.technician.name}
        </h1>
        <p className="text-sm text-muted" data-testid="visit-state">
          Opened {at(visit.openedAt)}
          {visit.closedAt ? ` · closed ${at(visit.closedAt)}` : " · open"}
        </p>
      </header>
      {error ? (
        <p role="alert" className="rounded border border-alarm p-2 text-sm text-alarm">
          {error}
        </p>
      ) : null}

      <section className="flex flex-col gap-2" aria-label="Times">
        <p className="text-sm">
          {remote ? "Started" : "Arrived"}: {at(visit.arrivedAt)} · {remote ? "Ended" : "Left"}: {at(visit.departedAt)}
        </p>
        {staff && open ? (
          <div className="flex gap-2">
            {visit.arrivedAt === null ? (
              <Button
                type="button"
                onClick={() =>
                  void run(() =>
                    fetchJson(`/api/visits/${visit.id}`, { method: "PATCH", body: JSON.stringify({ arrive: true }) }),
                  )
                }
              >
                {remote ? "Start" : "Arrived"}
              </Button>
            ) : visit.departedAt === null ? (
              <Button
                type="button"
                variant="secondary"
                onClick={() =>
                  void run(() =>
                    fetchJson(`/api/visits/${visit.id}`, { method: "PATCH", body: JSON.stringify({ depart: true }) }),
                  )
                }
              >
                {remote ? "End" : "Leaving site"}
              </Button>
            ) : null}
          </div>
        ) : null}
      </section>

      {visit.alarms.length ? (
        <section aria-labelledby="alarms-title">
          <h2 id="alarms-title" className="mb-2 text-lg font-semibold">
            Alarms
          </h2>
          <ul className="flex flex-col gap-2">
            {visit.alarms.map((a) => (
              <li key={a.id} className="flex items-center gap-2 rounded border border-line bg-panel p-3 text-sm">
                <Link href={`/alarms/${a.id}`} className="grow underline">
                  P{a.priority} {a.equipment}: {a.title}
                </Link>
                {staff && ackable.has(a.state) ? (
                  <Button type="button" onClick={() => void run(() => post(`/api/alarms/${a.id}/ack`, {}))}>
                    Acknowledge
                  </Button>
                ) : (
                  <span className="text-muted">{a.state.replace(/_/g, " ")}</span>
                )}
              </li>
            ))}
          </ul>
        </section>
      ) : null}

      <section aria-labelledby="changes-title">
        <h2 id="changes-title" className="mb-2 text-lg font-semibold">
          Temporary changes
        </h2>
        {visit.changes.length === 0 ? <p className="text-sm text-muted">None recorded.</p> : null}
        <ul className="flex flex-col gap-2">
          {visit.changes.map((c) => (
            <ChangeItem
              key={c.id}
              change={c}
              staff={staff}
              timeZone={tz}
              now={now}
              onPutBack={(valueNow) => run(() => post(`/api/temporary-changes/${c.id}/put-back`, { valueNow }))}
            />
          ))}
        </ul>
        {staff && open ? <ChangeForm visitId={visit.id} equipment={equipment} onSaved={() => void mutate()} /> : null}
      </section>

      {staff && visit.entries ? (
        <section aria-labelledby="log-title">
          <h2 id="log-title" className="mb-2 text-lg font-semibold">
            Log
          </h2>
          {visit.entries.length === 0 ? <p className="text-sm text-muted">Nothing written yet.</p> : null}
          <ol className="flex flex-col gap-2" data-testid="visit-log">
            {visit.entries.map((e) => (
              <li key={e.id} className="rounded bg-surface p-2 text-sm">
                <span className="font-mono text-xs text-muted">{at(e.at)}</span> {e.text}
              </li>
            ))}
          </ol>
        </section>
      ) : null}

      {visit.summary || !open ? (
        <section aria-labelledby="summary-title">
          <h2 id="summary-title" className="mb-2 text-lg font-semibold">
            Summary
          </h2>
          <p className="whitespace-pre-wrap text-sm">{visit.summary}</p>
          {visit.openChangesNote ? (
            <p className="mt-2 text-sm">
              Left in place: {visit.openChangesNote} — {visit.openChangesOwner?.name} will put{" "}
              {inPlace.length === 1 ? "it" : "them"} back.
            </p>
          ) : null}
        </section>
      ) : null}

      <VisitReportPanel visitId={visit.id} closed={!open} staff={staff} timeZone={tz} />

      {staff && open ? <CloseForm visit={visit} inPlace={inPlace.length} people={people} run={run} /> : null}
      {staff && open ? <LogBar visitId={visit.id} run={run} /> : null}
    </article>
  );
}

function ChangeItem({
  change: c,
  staff,
  timeZone,
  now,
  onPutBack,
}: {
  change: TemporaryChangeDto;
  staff: boolean;
  timeZone: string;
  now: number;
  onPutBack: (valueNow: string) => Promise<boolean>;
}) {
  const [valueNow, setValueNow] = useState(c.fromValue);
  const inPlace = c.putBackAt === null;
  const overdue = inPlace && c.putBackDueAt < now;
  return (
    <li
      className={`rounded border-2 p-3 text-sm ${inPlace ? "border-warning" : "border-line"}`}
      data-testid="visit-change"
    >
      {staff ? (
        <>
          <p className="font-semibold">
            {c.equipmentTag ? `${c.equipmentTag} ` : ""}
            {c.what}: {c.fromValue} → {c.toValue}
          </p>
          <p>{c.reason}</p>
          {inPlace ? (
            <p>
              In place for {inPlaceFor(c.madeAt, now)} · put back by{" "}
              <span className={overdue ? "font-semibold text-alarm" : ""}>
                {formatClock(c.putBackDueAt, timeZone, now)}
                {overdue ? " (overdue)" : ""}
              </span>
            </p>
          ) : (
            <p>
              Put back {formatClock(c.putBackAt!, timeZone, now)} by {c.putBackBy}, now {c.valueNow}
            </p>
          )}
          {c.liveCheck ? (
            <p
              className={c.liveCheck.matchesPutBack === false && !inPlace ? "font-semibold text-alarm" : "text-muted"}
              data-testid="live-check"
            >
              {c.liveCheck.message}
            </p>
          ) : null}
          {inPlace ? (
            <form
              className="mt-2 flex gap-2"
              onSubmit={(e) => {
                e.preventDefault();
                void onPutBack(valueNow);
              }}
            >
              <label className="sr-only" htmlFor={`value-now-${c.id}`}>
                Value now
              </label>
              <input
                id={`value-now-${c.id}`}
                className={input}
                value={valueNow}
                onChange={(e) => setValueNow(e.target.value)}
              />
              <Button type="submit" className="shrink-0">
                Put back
              </Button>
            </form>
          ) : null}
        </>
      ) : (
        <p>{c.plainText}</p>
      )}
    </li>
  );
}

function ChangeForm({
  visitId,
  equipment,
  onSaved,
}: {
  visitId: string;
  equipment: EquipmentOption[];
  onSaved: () => void;
}) {
  const now = useNow();
  const [shown, setShown] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const [fieldErrors, setFieldErrors] = useState<Record<string, string>>({});
  const submit = async (e: FormEvent<HTMLFormElement>) => {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    const text = (k: string) => String(f.get(k) ?? "").trim();
    const due = text("putBackDueAt");
    const body = {
      equipmentId: text("equipmentId") || undefined,
      kind: text("kind"),
      what: text("what"),
      pointQuantity: text("pointQuantity") || undefined,
      fromValue: text("fromValue"),
      toValue: text("toValue"),
      reason: text("reason"),
      putBackDueAt: due ? new Date(due).toISOString() : "",
    };
    setError(null);
    setFieldErrors({});
    const res = await fetch(`/api/visits/${visitId}/changes`, {
      method: "POST",
      headers: { "content-type": "application/json", accept: "application/json" },
      body: JSON.stringify(body),
    });
    if (res.ok) {
      setShown(false);
      onSaved();
      return;
    }
    const err = await res.json().catch(() => null);
    setError(err?.error?.message ?? `Could not save (${res.status})`);
    const details = (err?.error?.details ?? []) as Array<{ path: string; message: string }>;
    setFieldErrors(Object.fromEntries(details.map((d) => [d.path, d.message])));
  };
  if (!shown)
    return (
      <Button type="button" variant="secondary" className="mt-3" onClick={() => setShown(true)}>
        Record a temporary change
      </Button>
    );
  const label = (id: string, text: string) => (
    <label htmlFor={id} className="text-sm font-semibold">
      {text}
    </label>
  );
  const fieldError = (k: string) => (fieldErrors[k] ? <p className="text-sm text-alarm">{fieldErrors[k]}</p> : null);
  return (
    <form
      onSubmit={(e) => void submit(e)}
      noValidate
      className="mt-3 flex flex-col gap-3 rounded-lg border border-line bg-panel p-3"
      aria-label="Record a temporary change"
    >
      <p className="text-sm text-muted">{CHANGE_CAUTION}</p>
      {label("tc-equipment", "Equipment")}
      <select id="tc-equipment" name="equipmentId" className={input}>
        <option value="">Plant-wide</option>
        {equipment.map((e) => (
          <option key={e.id} value={e.id}>
            {e.tag} · {e.name}
          </option>
        ))}
      </select>
      {label("tc-kind", "Kind")}
      <select id="tc-kind" name="kind" className={input} defaultValue="controller_setting">
        {Object.entries(kindLabels).map(([k, v]) => (
          <option key={k} value={k}>
            {v}
          </option>
        ))}
      </select>
      {label("tc-point", "Setting shown by a live point (to check the put-back)")}
      <select id="tc-point" name="pointQuantity" className={input}>
        <option value="">None</option>
        {settingPoints.map((p) => (
          <option key={p.quantity} value={p.quantity}>
            {p.label}
          </option>
        ))}
      </select>
      {label("tc-what", "What")}
      <input id="tc-what" name="what" className={input} placeholder="e.g. Start-to-start timer" />
      {fieldError("what")}
      <div className="grid grid-cols-2 gap-2">
        <div className="flex flex-col gap-1">
          {label("tc-from", "From")}
          <input id="tc-from" name="fromValue" className={input} placeholder="20 min" />
          {fieldError("fromValue")}
        </div>
        <div className="flex flex-col gap-1">
          {label("tc-to", "To")}
          <input id="tc-to" name="toValue" className={input} placeholder="5 min" />
          {fieldError("toValue")}
        </div>
      </div>
      {label("tc-reason", "Why")}
      <input id="tc-reason" name="reason" className={input} placeholder="to recover from the trip" />
      {fieldError("reason")}
      {label("tc-due", "Put back by")}
      <input
        id="tc-due"
        name="putBackDueAt"
        type="datetime-local"
        className={input}
        defaultValue={localInput(now + 2 * 3600_000)}
      />
      {fieldError("putBackDueAt")}
      {error ? <p className="text-sm text-alarm">{error}</p> : null}
      <div className="flex gap-2">
        <Button type="submit">Save change</Button>
        <Button type="button" variant="secondary" onClick={() => setShown(false)}>
          Cancel
        </Button>
      </div>
    </form>
  );
}

function CloseForm({
  visit,
  inPlace,
  people,
  run,
}: {
  visit: VisitDto;
  inPlace: number;
  people: Person[];
  run: (fn: () => Promise<unknown>) => Promise<boolean>;
}) {
  const [summary, setSummary] = useState(visit.summary ?? "");
  const [note, setNote] = useState("");
  const [owner, setOwner] = useState("");
  return (
    <form
      aria-label="Close the visit"
      className="flex flex-col gap-2 rounded-lg border border-line bg-panel p-3"
      onSubmit={(e) => {
        e.preventDefault();
        void run(() =>
          post(`/api/visits/${visit.id}/close`, {
            summary,
            ...(inPlace ? { openChangesNote: note || undefined, openChangesOwnerId: owner || undefined } : {}),
          }),
        );
      }}
    >
      <h2 className="text-lg font-semibold">Close the visit</h2>
      <label htmlFor="close-summary" className="text-sm font-semibold">
        Summary: what you found and did
      </label>
      <textarea
        id="close-summary"
        rows={3}
        className="rounded border border-line bg-panel p-3 text-base"
        value={summary}
        onChange={(e) => setSummary(e.target.value)}
      />
      {inPlace ? (
        <>
          <p className="text-sm font-semibold text-alarm">
            {inPlace} temporary change{inPlace === 1 ? " is" : "s are"} still in place. Put{" "}
            {inPlace === 1 ? "it" : "them"} back, or say why not and who will.
          </p>
          <label htmlFor="close-note" className="text-sm font-semibold">
            Why it stays in place
          </label>
          <input id="close-note" className={input} value={note} onChange={(e) => setNote(e.target.value)} />
          <label htmlFor="close-owner" className="text-sm font-semibold">
            Who will put it back
          </label>
          <select id="close-owner" className={input} value={owner} onChange={(e) => setOwner(e.target.value)}>
            <option value="">Choose…</option>
            {people.map((p) => (
              <option key={p.id} value={p.id}>
                {p.name}
              </option>
            ))}
          </select>
        </>
      ) : null}
      <Button type="submit">Close visit</Button>
    </form>
  );
}

/** One text box and a send button, fixed at the bottom where a thumb reaches. */
function LogBar({ visitId, run }: { visitId: string; run: (fn: () => Promise<unknown>) => Promise<boolean> }) {
  const [text, setText] = useState("");
  const [sending, setSending] = useState(false);
  return (
    <form
      aria-label="Add to the log"
      className="fixed inset-x-0 bottom-0 z-10 border-t border-line bg-panel p-3"
      onSubmit={(e) => {
        e.preventDefault();
        if (!text.trim()) return;
        setSending(true);
        void run(() => post(`/api/visits/${visitId}/entries`, { text })).then((ok) => {
          if (ok) setText("");
          setSending(false);
        });
      }}
    >
      <div className="mx-auto flex max-w-6xl gap-2">
        <label htmlFor="log-text" className="sr-only">
          Finding or action
        </label>
        <input
          id="log-text"
          className={input}
          placeholder="Finding or action…"
          value={text}
          onChange={(e) => setText(e.target.value)}
          enterKeyHint="send"
        />
        <Button type="submit" disabled={sending} className="shrink-0">
          Send
        </Button>
      </div>
    </form>
  );
}
