import Link from "next/link";
import { memo } from "react";
import type { BoardSiteDto } from "@/lib/dto/board";
import { PriorityBadge } from "@/components/alarms/priority";
import { DataStatus, TrainingMark, alarmStateText, changesText, workText } from "./site-status-parts";

/** One plant as a compact row: name and customer, worst alarm, data status, changes and open work. */
export const SiteRow = memo(function SiteRow({
  site,
  canAct,
  nowMs,
}: {
  site: BoardSiteDto;
  canAct: boolean;
  nowMs: number;
}) {
  const w = site.status.worst;
  const work = workText(site);
  return (
    <li>
      <Link
        href={`/sites/${site.id}`}
        className={`grid grid-cols-1 gap-x-4 gap-y-1 px-3 py-2 hover:bg-surface sm:grid-cols-[minmax(0,14rem)_minmax(0,1fr)_auto] sm:items-center ${site.training ? "bg-surface/60" : ""}`}
        data-testid="site-row"
        data-site={site.id}
        data-training={site.training || undefined}
      >
        <div className="min-w-0">
          <p className="truncate font-semibold">{site.name}</p>
          <p className="truncate text-xs text-muted">{site.customer.name}</p>
        </div>
        <div className="min-w-0 text-sm">
          {w ? (
            <p className="flex min-w-0 items-center gap-2" data-testid="site-worst" data-rule={w.ruleId}>
              <PriorityBadge priority={w.priority} />
              <span className={`relative truncate ${w.active ? "font-semibold" : "text-muted"}`}>
                {canAct ? w.title : w.ownerTitle}
                <span className="sr-only"> ({alarmStateText(w)})</span>
              </span>
            </p>
          ) : (
            <p className="text-muted">No active alarms</p>
          )}
          {site.changes || work ? (
            <p className="truncate text-xs">
              {site.changes ? (
                <span
                  className={`font-semibold ${site.changes.earliestDueAt < nowMs ? "text-alarm" : ""}`}
                  data-testid="site-changes"
                >
                  {changesText(site.changes, nowMs)}
                </span>
              ) : null}
              {site.changes && work ? " · " : null}
              {work ? <span data-testid="site-work">{work}</span> : null}
            </p>
          ) : null}
        </div>
        <div className="flex flex-wrap items-center gap-1 sm:justify-end">
          {site.training ? <TrainingMark /> : null}
          <DataStatus data={site.status.data} />
        </div>
      </Link>
    </li>
  );
});
