"use client";

import { useState } from "react";
import useSWR from "swr";
import { Button } from "@/components/ui/button";
import { fetchJson } from "@/lib/client/fetcher";
import type { VisitReportDto } from "@/lib/dto/service";
import { formatClock } from "@/lib/service/changes";
import { useNow } from "./use-now";

/**
 * The customer's report of a visit: staff preview the PDF and send it to the site's contacts (again
 * when needed); the site's customer opens the report once it was sent.
 */
export function VisitReportPanel({
  visitId,
  closed,
  staff,
  timeZone,
}: {
  visitId: string;
  closed: boolean;
  staff: boolean;
  timeZone: string;
}) {
  const now = useNow();
  const { data, mutate } = useSWR<{ reports: VisitReportDto[] }>(`/api/visits/${visitId}/report`, fetchJson);
  const [sending, setSending] = useState(false);
  const [message, setMessage] = useState<{ error: boolean; text: string } | null>(null);
  const reports = data?.reports ?? [];
  const pdfUrl = `/api/visits/${visitId}/report.pdf`;
  if (!staff && reports.length === 0) return null;
  const send = async () => {
    setSending(true);
    setMessage(null);
    try {
      const { report } = await fetchJson<{ report: VisitReportDto }>(`/api/visits/${visitId}/report`, {
        method: "POST",
        body: JSON.stringify({}),
      });
      setMessage({ error: false, text: `Sent to ${report.recipients.join(", ")}.` });
      await mutate();
    } catch (err) {
      setMessage({ error: true, text: (err as Error).message });
    } finally {
      setSending(false);
    }
  };
  return (
    <section aria-labelledby="report-title" data-testid="visit-report">
      <h2 id="report-title" className="mb-2 text-lg font-semibold">
        Customer&apos;s report
      </h2>
      <div className="flex flex-wrap gap-2">
        <a
          href={pdfUrl}
          target="_blank"
          rel="noopener"
          className="inline-flex min-h-11 items-center justify-center rounded border border-line bg-panel px-4 text-sm font-semibold text-ink hover:bg-surface"
        >
          {staff ? "Preview report" : "Open report (PDF)"}
        </a>
        {staff ? (
          <Button type="button" onClick={() => void send()} disabled={!closed || sending}>
            {sending ? "Sending…" : "Send report to the site's contacts"}
          </Button>
        ) : null}
      </div>
      {staff && !closed ? <p className="mt-2 text-sm text-muted">Close the visit to send its report.</p> : null}
      {message ? (
        <p role={message.error ? "alert" : "status"} className={`mt-2 text-sm ${message.error ? "text-alarm" : ""}`}>
          {message.text}
        </p>
      ) : null}
      {reports.length ? (
        <ul className="mt-2 flex flex-col gap-1 text-sm text-muted">
          {reports.map((r) => (
            <li key={r.id}>
              Sent {formatClock(r.sentAt, timeZone, now)} by {r.sentBy} to {r.recipients.join(", ")}
            </li>
          ))}
        </ul>
      ) : null}
    </section>
  );
}
