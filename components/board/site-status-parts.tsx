import type { BoardSiteDto } from "@/lib/dto/board";
import type { SiteStatus } from "@/lib/realtime/events";
import { inPlaceFor } from "@/lib/service/changes";

// The words and marks the card and the list row share. Every state is said in words with a
// shape beside it; colour only adds weight to what is abnormal.

export const dataLabel: Record<SiteStatus["data"], string> = {
  live: "Live",
  stale: "Stale data",
  offline: "Gateway offline",
  no_gateway: "No gateway",
};

const crossoverRules = new Set(["crossover_risk", "restart_race", "loops_crossed"]);
export const isCrossover = (w: SiteStatus["worst"]) => Boolean(w?.active && crossoverRules.has(w.ruleId));

export function DataStatus({ data }: { data: SiteStatus["data"] }) {
  const live = data === "live";
  return (
    <span
      className={`inline-flex shrink-0 items-center gap-1 rounded px-2 py-0.5 text-xs font-semibold ${live ? "text-muted" : "border border-dashed border-ink text-ink"}`}
      data-testid="site-data"
      data-state={data}
    >
      <span aria-hidden="true">{live ? "●" : data === "stale" ? "◐" : "○"}</span>
      {dataLabel[data]}
    </span>
  );
}

export function TrainingMark() {
  return (
    <span
      className="inline-flex shrink-0 items-center rounded border border-line bg-surface px-2 py-0.5 text-xs font-semibold uppercase tracking-wide text-ink"
      data-testid="site-training"
    >
      Training
    </span>
  );
}

/** "2 temporary changes in place for 3 h · overdue". */
export function changesText(changes: NonNullable<BoardSiteDto["changes"]>, nowMs: number): string {
  const n = changes.count === 1 ? "1 temporary change" : `${changes.count} temporary changes`;
  return `${n} in place for ${inPlaceFor(changes.oldestMadeAt, nowMs)}${changes.earliestDueAt < nowMs ? " · overdue" : ""}`;
}

/** "1 open request · 1 visit open", or null when there is neither. */
export function workText(site: Pick<BoardSiteDto, "openRequests" | "openVisits">): string | null {
  const parts: string[] = [];
  if (site.openRequests) parts.push(site.openRequests === 1 ? "1 open request" : `${site.openRequests} open requests`);
  if (site.openVisits) parts.push(site.openVisits === 1 ? "1 visit open" : `${site.openVisits} visits open`);
  return parts.length ? parts.join(" · ") : null;
}

/** Active, or cleared and waiting for acknowledgement (ISA-18.2 "return to normal unacknowledged"). */
export const alarmStateText = (w: NonNullable<SiteStatus["worst"]>) =>
  w.active ? "Active" : "Cleared, not acknowledged";
