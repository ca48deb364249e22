"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { useState } from "react";
import { useForm } from "react-hook-form";
import {
  ackSchema,
  noteSchema,
  shelveSchema,
  type AckInput,
  type NoteInput,
  type ShelveInput,
} from "@/lib/schemas/alarms";
import { Button } from "@/components/ui/button";
import { fetchJson } from "@/lib/client/fetcher";

const post = (url: string, body: unknown) => fetchJson(url, { method: "POST", body: JSON.stringify(body) });

/** Acknowledge (with an optional note), add a note, shelve or unshelve — staff only. */
export function AlarmActions({ alarmId, state, onDone }: { alarmId: string; state: string; onDone: () => void }) {
  const [panel, setPanel] = useState<"note" | "shelve" | null>(null);
  const [error, setError] = useState<string | null>(null);
  const ack = useForm<AckInput>({ resolver: zodResolver(ackSchema) });
  const note = useForm<NoteInput>({ resolver: zodResolver(noteSchema), defaultValues: { visibility: "internal" } });
  const shelve = useForm<ShelveInput>({ resolver: zodResolver(shelveSchema), defaultValues: { minutes: 60 } });
  const canAck = state === "unacknowledged" || state === "returned_unacknowledged" || state === "latched";

  const run = (fn: () => Promise<unknown>) => async () => {
    setError(null);
    try {
      await fn();
      setPanel(null);
      onDone();
    } catch (err) {
      setError((err as Error).message);
    }
  };

  return (
    <div className="flex flex-col gap-3">
      {canAck ? (
        <form
          className="flex flex-col gap-2 sm:flex-row"
          onSubmit={ack.handleSubmit((v) => run(() => post(`/api/alarms/${alarmId}/ack`, v))().then(() => ack.reset()))}
        >
          <label className="sr-only" htmlFor={`ack-note-${alarmId}`}>
            Acknowledge note
          </label>
          <input
            id={`ack-note-${alarmId}`}
            placeholder="Note (optional): what you are doing"
            className="min-h-11 grow rounded border border-line bg-panel px-3"
            {...ack.register("note")}
          />
          <Button type="submit" disabled={ack.formState.isSubmitting}>
            Acknowledge
          </Button>
        </form>
      ) : null}
      <div className="flex flex-wrap gap-2">
        <Button
          variant="secondary"
          type="button"
          onClick={() => setPanel(panel === "note" ? null : "note")}
          aria-expanded={panel === "note"}
        >
          Add note
        </Button>
        {state === "shelved" ? (
          <Button variant="secondary" type="button" onClick={run(() => post(`/api/alarms/${alarmId}/unshelve`, {}))}>
            Unshelve
          </Button>
        ) : (
          <Button
            variant="secondary"
            type="button"
            onClick={() => setPanel(panel === "shelve" ? null : "shelve")}
            aria-expanded={panel === "shelve"}
          >
            Shelve…
          </Button>
        )}
      </div>
      {panel === "note" ? (
        <form
          className="flex flex-col gap-2"
          onSubmit={note.handleSubmit((v) =>
            run(() => post(`/api/alarms/${alarmId}/notes`, v))().then(() =>
              note.reset({ text: "", visibility: v.visibility }),
            ),
          )}
        >
          <label htmlFor={`note-${alarmId}`} className="text-sm font-semibold">
            Note
          </label>
          <textarea
            id={`note-${alarmId}`}
            rows={3}
            className="rounded border border-line bg-panel p-2"
            {...note.register("text")}
          />
          {note.formState.errors.text ? (
            <p className="text-sm text-alarm">{note.formState.errors.text.message}</p>
          ) : null}
          <fieldset className="flex flex-wrap gap-4 text-sm">
            <legend className="sr-only">Who sees it</legend>
            <label className="flex min-h-11 items-center gap-2">
              <input type="radio" value="internal" {...note.register("visibility")} /> Service team only
            </label>
            <label className="flex min-h-11 items-center gap-2">
              <input type="radio" value="customer" {...note.register("visibility")} /> Shared with the building owner
            </label>
          </fieldset>
          <Button type="submit" disabled={note.formState.isSubmitting}>
            Save note
          </Button>
        </form>
      ) : null}
      {panel === "shelve" ? (
        <form
          className="flex flex-col gap-2 sm:flex-row sm:items-end"
          onSubmit={shelve.handleSubmit((v) => run(() => post(`/api/alarms/${alarmId}/shelve`, v))())}
        >
          <div className="flex flex-col gap-1">
            <label htmlFor={`shelve-min-${alarmId}`} className="text-sm font-semibold">
              Minutes
            </label>
            <input
              id={`shelve-min-${alarmId}`}
              type="number"
              min={1}
              max={1440}
              className="min-h-11 w-28 rounded border border-line bg-panel px-3"
              {...shelve.register("minutes", { valueAsNumber: true })}
            />
          </div>
          <div className="flex grow flex-col gap-1">
            <label htmlFor={`shelve-why-${alarmId}`} className="text-sm font-semibold">
              Reason
            </label>
            <input
              id={`shelve-why-${alarmId}`}
              className="min-h-11 rounded border border-line bg-panel px-3"
              {...shelve.register("reason")}
            />
          </div>
          <Button type="submit">Shelve</Button>
          {shelve.formState.errors.reason || shelve.formState.errors.minutes ? (
            <p className="text-sm text-alarm">
              {shelve.formState.errors.reason?.message ?? shelve.formState.errors.minutes?.message}
            </p>
          ) : null}
        </form>
      ) : null}
      {error ? (
        <p role="alert" className="text-sm text-alarm">
          {error}
        </p>
      ) : null}
    </div>
  );
}
