import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { getIncident, listIncidents } from "@/db/queries/incidents";
import { IncidentEditor, IncidentRegroup } from "@/components/incidents/incident-editor";
import { IncidentTrends, type TrendMarker } from "@/components/incidents/incident-trends";
import { canAct, seesAllSites } from "@/lib/auth/viewer";
import { formatClock, formatDateTime, formatDelta } from "@/lib/client/format";
import { draftCustomerSummary, parseCustomerSummary } from "@/lib/incidents/customer-summary";
import type { TimelineEntry } from "@/lib/incidents/timeline";
import { buildIncidentReview } from "@/lib/server/incidents";
import { getDb } from "@/lib/server/runtime";
import { formatDuration, formatValue } from "@/lib/units";
import { requirePageViewer } from "../../../(auth)/auth";

export const dynamic = "force-dynamic";

type Props = { params: Promise<{ incidentId: string }> };

export async function generateMetadata({ params }: Props): Promise<Metadata> {
  const viewer = await requirePageViewer();
  return { title: getIncident(getDb(), viewer, (await params).incidentId)?.title ?? "Not found" };
}

const kindWords: Record<TimelineEntry["kind"], string> = {
  plant: "Plant",
  alarm: "Alarm",
  acknowledgement: "Acknowledged",
  shelving: "Shelving",
  note: "Note",
  visit: "Visit log",
  change_made: "Change made",
  change_put_back: "Put back",
};

function Figure({ label, value, detail }: { label: string; value: string; detail?: string }) {
  return (
    <div className="rounded border border-line bg-panel p-3" data-testid="key-figure">
      <dt className="text-sm text-muted">{label}</dt>
      <dd className="text-xl font-semibold tabular-nums">{value}</dd>
      {detail ? <dd className="text-xs text-muted">{detail}</dd> : null}
    </div>
  );
}

export default async function IncidentPage({ params }: Props) {
  const viewer = await requirePageViewer();
  const id = (await params).incidentId;
  if (!getIncident(getDb(), viewer, id)) notFound();
  const review = buildIncidentReview(getDb(), viewer, id);
  const { incident, keyFigures: f, timeline } = review;
  const tz = incident.siteTimeZone;
  const staff = seesAllSites(viewer);
  const span = `${formatDateTime(incident.startedAtMs, tz)}${
    incident.endedAtMs ? ` – ${formatDateTime(incident.endedAtMs, tz)}` : " · still lasting"
  }`;
  const header = (
    <header className="mb-4">
      <p className="text-sm">
        <Link href={`/incidents?site=${incident.siteId}`} className="underline">
          Incidents
        </Link>{" "}
        ·{" "}
        <Link href={`/sites/${incident.siteId}`} className="underline">
          {incident.siteName}
        </Link>
      </p>
      <h1 className="text-2xl font-semibold">{incident.title}</h1>
      <p className="text-muted">
        {span} · times in {tz} · <span data-testid="incident-state">{incident.state}</span>
      </p>
      <p className="mt-1 text-sm">
        <a href={`/api/incidents/${incident.id}/report.pdf`} className="underline">
          PDF
        </a>
      </p>
    </header>
  );
  if (!staff) {
    const parts = parseCustomerSummary(incident.customerSummary);
    return (
      <article className="max-w-2xl">
        {header}
        {(
          [
            ["What happened", parts.happened],
            ["What was done", parts.done],
            ["What we recommend", parts.recommended],
          ] as const
        ).map(([title, text]) => (
          <section key={title} className="mb-4">
            <h2 className="text-lg font-semibold">{title}</h2>
            <p className="whitespace-pre-line">{text || "—"}</p>
          </section>
        ))}
      </article>
    );
  }

  const sys = viewer.unitSystem;
  const dur = (s: number | null) => (s === null ? "—" : formatDuration(s));
  const markers: TrendMarker[] = timeline
    .filter((e) => (e.kind === "alarm" && /raised/.test(e.text)) || e.kind !== "alarm")
    .map((e) => ({ atMs: e.atMs, label: e.text, strong: e.kind === "alarm" }));
  const siblings = listIncidents(getDb(), viewer, { siteId: incident.siteId, limit: 50 }).filter(
    (i) => i.id !== incident.id,
  );
  const draft = draftCustomerSummary({
    members: incident.members,
    figures: f,
    actions: timeline.filter((e) => e.kind === "change_made" || e.kind === "visit").map((e) => e.text),
  });
  return (
    <article>
      {header}
      <section aria-labelledby="figures-title" className="mb-6">
        <h2 id="figures-title" className="mb-2 text-lg font-semibold">
          Key figures
        </h2>
        <dl className="grid grid-cols-2 gap-2 md:grid-cols-3">
          <Figure
            label="Warning lead"
            value={dur(f.warningLeadS)}
            detail={
              f.firstWarning && f.leadEnd
                ? `${formatClock(f.firstWarning.atMs, tz)} → ${f.leadEnd.kind} ${formatClock(f.leadEnd.atMs, tz)}`
                : "no crossover warning"
            }
          />
          <Figure label="Time to acknowledge" value={dur(f.timeToAcknowledgeS)} />
          <Figure label="Time to first action" value={dur(f.timeToFirstActionS)} />
          <Figure
            label="Time to recovery"
            value={dur(f.timeToRecoveryS)}
            detail={f.timeToRecoveryS === null ? "not recovered yet" : undefined}
          />
          <Figure
            label="Lowest margin"
            value={f.lowestMargin ? formatDelta(f.lowestMargin.valueK, sys) : "—"}
            detail={
              f.lowestMargin
                ? `${formatClock(f.lowestMargin.atMs, tz)}${f.lowestMargin.valueK <= 0 ? " · crossed" : ""}`
                : undefined
            }
          />
          <Figure
            label="Highest drive temperature"
            value={f.highestDriveTemp ? formatValue(f.highestDriveTemp.valueC, "temperature", sys) : "—"}
            detail={f.highestDriveTemp ? formatClock(f.highestDriveTemp.atMs, tz) : undefined}
          />
        </dl>
      </section>
      <div className="grid grid-cols-1 gap-6 lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
        <section aria-labelledby="trends-title" className="min-w-0">
          <h2 id="trends-title" className="mb-2 text-lg font-semibold">
            Trends
          </h2>
          <IncidentTrends
            panels={review.panels}
            markers={markers}
            timeZone={tz}
            fromMs={review.fromMs}
            toMs={review.toMs}
          />
        </section>
        <section aria-labelledby="timeline-title" className="min-w-0">
          <h2 id="timeline-title" className="mb-2 text-lg font-semibold">
            Timeline ({timeline.length})
          </h2>
          <ol
            className="flex max-h-[48rem] flex-col overflow-y-auto rounded border border-line bg-panel"
            data-testid="incident-timeline"
          >
            {timeline.map((e, i) => (
              <li
                key={i}
                className="grid grid-cols-[5.5rem_minmax(0,1fr)] gap-2 border-b border-line px-3 py-2 text-sm last:border-b-0"
                data-kind={e.kind}
                data-at={e.atMs}
              >
                <time dateTime={new Date(e.atMs).toISOString()} className="tabular-nums text-muted">
                  {formatClock(e.atMs, tz)}
                </time>
                <span>
                  <span
                    className={`font-semibold ${e.kind === "alarm" && e.priority !== undefined && e.priority <= 2 && /raised/.test(e.text) ? "text-alarm" : ""}`}
                  >
                    {kindWords[e.kind]}
                    {e.equipment ? ` · ${e.equipment}` : ""}
                  </span>{" "}
                  {e.text}
                  {e.who ? <span className="text-muted"> — {e.who}</span> : null}
                </span>
              </li>
            ))}
          </ol>
        </section>
      </div>
      {canAct(viewer) ? (
        <div className="mt-6 grid grid-cols-1 gap-6 lg:grid-cols-2">
          <IncidentEditor incident={incident} draft={draft} />
          <IncidentRegroup incident={incident} siblings={siblings} />
        </div>
      ) : null}
    </article>
  );
}
