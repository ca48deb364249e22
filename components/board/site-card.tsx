import Link from "next/link";
import { memo } from "react";
import type { BoardSiteDto } from "@/lib/dto/board";
import { PriorityBadge } from "@/components/alarms/priority";
import { DataStatus, TrainingMark, alarmStateText, changesText, isCrossover, workText } from "./site-status-parts";

const edge: Record<number, string> = {
  1: "border-l-critical",
  2: "border-l-alarm",
  3: "border-l-warning",
  4: "border-l-line",
};

/** One plant as a card. Memoised: a status push re-renders only the plant it is about. */
export const SiteCard = memo(function SiteCard({
  site,
  canAct,
  nowMs,
}: {
  site: BoardSiteDto;
  canAct: boolean;
  /** Only for sites with changes in place; 0 otherwise so a clock tick does not re-render them. */
  nowMs: number;
}) {
  const w = site.status.worst;
  const crossover = isCrossover(w);
  const overdue = site.changes !== null && site.changes.earliestDueAt < nowMs;
  const work = workText(site);
  return (
    <li>
      <Link
        href={`/sites/${site.id}`}
        className={`block h-full rounded-lg border border-l-8 border-line bg-panel p-4 hover:border-ink ${w?.active ? edge[w.priority] : "border-l-line"} ${crossover ? "ring-2 ring-alarm" : ""} ${site.training ? "border-dashed" : ""}`}
        data-testid="site-card"
        data-site={site.id}
        data-training={site.training || undefined}
      >
        <div className="flex items-start justify-between gap-2">
          <h2 className="min-w-0 font-semibold break-words">{site.name}</h2>
          <div className="flex shrink-0 flex-col items-end gap-1">
            {site.training ? <TrainingMark /> : null}
            <DataStatus data={site.status.data} />
          </div>
        </div>
        <p className="mt-1 text-sm text-muted">{site.customer.name}</p>
        {w ? (
          <div className="mt-3 flex flex-col gap-1" data-testid="site-worst" data-rule={w.ruleId}>
            <div className="flex flex-wrap items-center gap-2">
              <PriorityBadge priority={w.priority} />
              <span className="text-xs font-semibold text-muted">{alarmStateText(w)}</span>
              {crossover ? <span className="text-sm font-semibold text-alarm">Loops heading for crossover</span> : null}
            </div>
            <p className={`text-sm leading-snug ${w.active ? "font-semibold" : "text-muted"}`}>
              {canAct ? w.title : w.ownerTitle}
            </p>
          </div>
        ) : (
          <p className="mt-3 text-sm text-muted">No active alarms</p>
        )}
        {site.changes ? (
          <p
            className={`mt-3 rounded px-2 py-1 text-sm font-semibold ${overdue ? "bg-alarm text-white" : "border border-warning/60 bg-warning/10"}`}
            data-testid="site-changes"
          >
            {changesText(site.changes, nowMs)}
          </p>
        ) : null}
        <p className="mt-3 text-sm">
          {site.status.unacknowledged ? (
            <span className="font-semibold" data-testid="site-unack">
              {site.status.unacknowledged} unacknowledged ·{" "}
            </span>
          ) : null}
          {work ? (
            <span className="font-semibold" data-testid="site-work">
              {work} ·{" "}
            </span>
          ) : null}
          <span className="text-muted">
            {site.kind} · {site.equipmentCount} pieces of equipment
          </span>
        </p>
      </Link>
    </li>
  );
});
