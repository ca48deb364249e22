"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { useState } from "react";
import { useForm } from "react-hook-form";
import useSWR from "swr";
import { shiftSchema, type ShiftInput, type ShiftOutput } from "@/lib/schemas/oncall";
import type { ShiftDto } from "@/lib/dto/oncall";
import { Button } from "@/components/ui/button";
import { fetchJson } from "@/lib/client/fetcher";
import { formatDateTime } from "@/lib/client/format";

type RotaData = { shifts: ShiftDto[]; people: Array<{ id: string; name: string; role: string }> };

/** The on-call rota: everyone on staff sees it; admins add and remove shifts. */
export function RotaEditor({ canEdit, nowMs }: { canEdit: boolean; nowMs: number }) {
  const { data, mutate, error } = useSWR<RotaData>("/api/oncall", fetchJson);
  const [actionError, setActionError] = useState<string | null>(null);
  const form = useForm<ShiftInput, unknown, ShiftOutput>({ resolver: zodResolver(shiftSchema) });

  async function onAdd(values: ShiftOutput) {
    setActionError(null);
    try {
      // datetime-local values are the browser's local time; send them with their offset.
      const body = {
        ...values,
        startsAt: new Date(values.startsAt).toISOString(),
        endsAt: new Date(values.endsAt).toISOString(),
      };
      await fetchJson("/api/oncall", { method: "POST", body: JSON.stringify(body) });
      form.reset();
      await mutate();
    } catch (err) {
      setActionError((err as Error).message);
    }
  }

  async function onRemove(id: string) {
    setActionError(null);
    try {
      await fetchJson(`/api/oncall/${id}`, { method: "DELETE" });
      await mutate();
    } catch (err) {
      setActionError((err as Error).message);
    }
  }

  const field = "min-h-11 rounded border border-line bg-panel px-2";
  const e = form.formState.errors;
  return (
    <div className="flex flex-col gap-4">
      {error ? <p className="text-alarm">{error.message}</p> : null}
      <ul className="flex flex-col gap-2" data-testid="rota">
        {(data?.shifts ?? []).map((s) => {
          const current = s.startsAt <= nowMs && nowMs < s.endsAt;
          return (
            <li
              key={s.id}
              className={`flex flex-wrap items-center gap-x-4 gap-y-1 rounded-lg border bg-panel px-4 py-3 ${current ? "border-ink" : "border-line"}`}
            >
              {current ? (
                <span className="rounded bg-ink px-2 py-0.5 text-xs font-semibold text-on-strong">On call now</span>
              ) : null}
              <span className="text-sm">
                {formatDateTime(s.startsAt)} → {formatDateTime(s.endsAt)}
              </span>
              <span className="text-sm">
                <strong>{s.primaryName}</strong>
                {s.backupName ? <span className="text-muted"> · backup {s.backupName}</span> : null}
              </span>
              {canEdit ? (
                <Button variant="danger" className="ml-auto" onClick={() => onRemove(s.id)}>
                  Remove
                </Button>
              ) : null}
            </li>
          );
        })}
        {data && data.shifts.length === 0 ? (
          <li className="text-muted">Nobody is on the rota: high-priority alarms go to the admins.</li>
        ) : null}
      </ul>
      {canEdit ? (
        <form
          onSubmit={form.handleSubmit(onAdd)}
          noValidate
          className="grid gap-3 rounded-lg border border-line bg-panel p-4 sm:grid-cols-2"
        >
          <h2 className="font-semibold sm:col-span-2">Add a shift</h2>
          <label className="flex flex-col gap-1 text-sm">
            Starts
            <input type="datetime-local" className={field} {...form.register("startsAt")} />
            {e.startsAt ? <span className="text-alarm">{e.startsAt.message}</span> : null}
          </label>
          <label className="flex flex-col gap-1 text-sm">
            Ends
            <input type="datetime-local" className={field} {...form.register("endsAt")} />
            {e.endsAt ? <span className="text-alarm">{e.endsAt.message}</span> : null}
          </label>
          <label className="flex flex-col gap-1 text-sm">
            Primary
            <select className={field} {...form.register("primaryUserId")}>
              <option value="">Choose…</option>
              {(data?.people ?? []).map((p) => (
                <option key={p.id} value={p.id}>
                  {p.name}
                </option>
              ))}
            </select>
            {e.primaryUserId ? <span className="text-alarm">{e.primaryUserId.message}</span> : null}
          </label>
          <label className="flex flex-col gap-1 text-sm">
            Backup
            <select className={field} {...form.register("backupUserId")}>
              <option value="">None</option>
              {(data?.people ?? []).map((p) => (
                <option key={p.id} value={p.id}>
                  {p.name}
                </option>
              ))}
            </select>
            {e.backupUserId ? <span className="text-alarm">{e.backupUserId.message}</span> : null}
          </label>
          <div className="sm:col-span-2">
            <Button type="submit" disabled={form.formState.isSubmitting}>
              Add shift
            </Button>
          </div>
        </form>
      ) : null}
      {actionError ? <p className="text-alarm">{actionError}</p> : null}
    </div>
  );
}
