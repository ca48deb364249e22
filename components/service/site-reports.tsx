import type { VisitReportDto } from "@/lib/dto/service";

/** Reports sent for a site's visits, one line per visit (its latest sending), with a link to the PDF. */
export function SiteReports({ reports, timeZone }: { reports: VisitReportDto[]; timeZone: string }) {
  const latest = [...new Map([...reports].reverse().map((r) => [r.visitId, r])).values()].sort(
    (a, b) => b.sentAt - a.sentAt,
  );
  if (latest.length === 0) return null;
  const day = new Intl.DateTimeFormat("en-US", { timeZone, dateStyle: "medium" });
  return (
    <section aria-labelledby="site-reports-title" className="mb-4" data-testid="site-reports">
      <h2 id="site-reports-title" className="mb-2 text-lg font-semibold">
        Visit reports
      </h2>
      <ul className="flex flex-col gap-1 text-sm">
        {latest.map((r) => (
          <li key={r.visitId}>
            <a href={`/api/visits/${r.visitId}/report.pdf`} target="_blank" rel="noopener" className="underline">
              Visit of {day.format(r.visitClosedAt ?? r.visitOpenedAt)} (PDF)
            </a>{" "}
            <span className="text-muted">· sent {day.format(r.sentAt)}</span>
          </li>
        ))}
      </ul>
    </section>
  );
}
