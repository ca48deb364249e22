"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { useRouter } from "next/navigation";
import { useState } from "react";
import { useForm } from "react-hook-form";
import useSWR from "swr";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { fetchJson } from "@/lib/client/fetcher";
import type { ServiceRequestDto, VisitDto } from "@/lib/dto/service";
import { createServiceRequestSchema, type CreateServiceRequestInput } from "@/lib/schemas/service";
import { formatClock } from "@/lib/service/changes";
import { useNow } from "./use-now";

const QUEUE_PREVIEW = 3;

const urgencyLabel = { not_urgent: "Not urgent", today: "Today", now: "Now" } as const;

/** The customer's "Ask for service" form and their site's requests with their state in plain words. */
export function ServiceRequestPanel({ siteId, timeZone }: { siteId: string; timeZone: string }) {
  const { data, mutate } = useSWR<{ requests: ServiceRequestDto[] }>(`/api/service-requests?site=${siteId}`, fetchJson);
  const [sent, setSent] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const form = useForm<CreateServiceRequestInput>({
    resolver: zodResolver(createServiceRequestSchema),
    defaultValues: { siteId, urgency: "today", description: "", callbackPhone: "" },
  });
  const submit = form.handleSubmit(async (values) => {
    setError(null);
    try {
      await fetchJson("/api/service-requests", { method: "POST", body: JSON.stringify(values) });
      form.reset({ siteId, urgency: "today", description: "", callbackPhone: values.callbackPhone });
      setSent(true);
      await mutate();
    } catch (err) {
      setError((err as Error).message);
    }
  });
  const errors = form.formState.errors;
  const now = useNow();
  return (
    <section className="mt-8" aria-labelledby="service-title">
      <h2 id="service-title" className="mb-2 text-lg font-semibold">
        Ask for service
      </h2>
      <form onSubmit={submit} className="flex flex-col gap-3 rounded-lg border border-line bg-panel p-3">
        <div className="flex flex-col gap-1">
          <label htmlFor="sr-description" className="text-sm font-semibold">
            What do you see?
          </label>
          <textarea
            id="sr-description"
            rows={3}
            className="rounded border border-line bg-panel p-3 text-base"
            aria-invalid={errors.description ? true : undefined}
            {...form.register("description")}
          />
          {errors.description ? <p className="text-sm text-alarm">{errors.description.message}</p> : null}
        </div>
        <fieldset className="flex flex-col gap-1">
          <legend className="text-sm font-semibold">How urgent?</legend>
          <div className="flex flex-wrap gap-4">
            {(["not_urgent", "today", "now"] as const).map((u) => (
              <label key={u} className="flex min-h-11 items-center gap-2">
                <input type="radio" value={u} {...form.register("urgency")} />
                {urgencyLabel[u]}
              </label>
            ))}
          </div>
        </fieldset>
        <Field
          id="sr-phone"
          label="Call-back number"
          type="tel"
          autoComplete="tel"
          error={errors.callbackPhone?.message}
          {...form.register("callbackPhone")}
        />
        <Button type="submit" disabled={form.formState.isSubmitting}>
          Send request
        </Button>
        {sent ? <p className="text-sm">Sent. The technician on call has been told.</p> : null}
        {error ? <p className="text-sm text-alarm">{error}</p> : null}
      </form>
      {data?.requests.length ? (
        <ul className="mt-3 flex flex-col gap-2" data-testid="request-list">
          {data.requests.map((r) => (
            <li key={r.id} className="rounded border border-line bg-panel p-3 text-sm">
              <p className="font-semibold">{r.stateText}</p>
              <p className="text-muted">
                {formatClock(r.createdAt, timeZone, now)} · {urgencyLabel[r.urgency]} · {r.description}
              </p>
            </li>
          ))}
        </ul>
      ) : null}
    </section>
  );
}

/** Open service requests on the technician's board, each with "Take it" (opens a visit). */
export function ServiceRequestQueue() {
  const router = useRouter();
  const { data, mutate } = useSWR<{ requests: ServiceRequestDto[] }>("/api/service-requests?open=1", fetchJson, {
    refreshInterval: 30_000,
  });
  const [error, setError] = useState<string | null>(null);
  const [all, setAll] = useState(false);
  const now = useNow();
  const open = (data?.requests ?? []).filter((r) => r.visitId === null);
  if (open.length === 0) return null;
  // A large portfolio can have many waiting: the first few, so the board below stays in reach on a phone.
  const shown = all ? open : open.slice(0, QUEUE_PREVIEW);
  const take = async (requestId: string) => {
    setError(null);
    try {
      const { visit } = await fetchJson<{ visit: VisitDto }>("/api/visits", {
        method: "POST",
        body: JSON.stringify({ serviceRequestId: requestId, mode: "on_site" }),
      });
      router.push(`/visits/${visit.id}`);
    } catch (err) {
      setError((err as Error).message);
      await mutate();
    }
  };
  return (
    <section className="mb-6" aria-labelledby="requests-title">
      <h2 id="requests-title" className="text-lg font-semibold">
        Service requests
      </h2>
      {error ? <p className="text-sm text-alarm">{error}</p> : null}
      <ul className="mt-2 flex flex-col gap-2" data-testid="request-queue">
        {shown.map((r) => (
          <li
            key={r.id}
            className="flex flex-col gap-2 rounded-lg border border-l-8 border-line border-l-warning bg-panel p-3 sm:flex-row sm:items-center"
          >
            <div className="grow text-sm">
              <p className="font-semibold">
                {r.siteName} · {urgencyLabel[r.urgency]}
              </p>
              <p>{r.description}</p>
              <p className="text-muted">
                {r.requestedBy} ·{" "}
                <a href={`tel:${r.callbackPhone}`} className="underline">
                  {r.callbackPhone}
                </a>{" "}
                · {formatClock(r.createdAt, r.siteTimeZone, now)}
              </p>
            </div>
            <Button type="button" onClick={() => void take(r.id)}>
              Take it
            </Button>
          </li>
        ))}
      </ul>
      {open.length > QUEUE_PREVIEW ? (
        <Button type="button" variant="secondary" className="mt-2" aria-expanded={all} onClick={() => setAll(!all)}>
          {all ? "Show fewer requests" : `Show all ${open.length} requests`}
        </Button>
      ) : null}
    </section>
  );
}
