import type { AlarmEventDto } from "@/lib/dto/alarms";
import { formatDateTime } from "@/lib/client/format";
import { ownerStateLabel, stateLabel } from "./priority";

const causeLabel: Record<string, string> = {
  condition_active: "Condition became active",
  condition_cleared: "Condition cleared",
  acknowledged: "Acknowledged",
  shelved: "Shelved",
  unshelved: "Unshelved",
  shelf_expired: "Shelving expired",
  suppressed: "Suppressed by design",
  unsuppressed: "Suppression lifted",
  removed_from_service: "Removed from service",
  returned_to_service: "Returned to service",
};

/** The audit trail: every transition with event time, wall time, who and any note. */
export function AlarmTimeline({
  events,
  staff,
  timeZone,
}: {
  events: AlarmEventDto[];
  staff: boolean;
  timeZone: string;
}) {
  const labels = staff ? stateLabel : ownerStateLabel;
  return (
    <ol className="flex flex-col gap-2" data-testid="alarm-timeline">
      {events.map((e) => (
        <li key={e.id} className="rounded border border-line bg-panel px-3 py-2 text-sm">
          <div className="flex flex-wrap justify-between gap-2">
            <span className="font-semibold">{causeLabel[e.cause] ?? e.cause}</span>
            <span className="text-muted" title={`recorded ${new Date(e.wallAtMs).toISOString()}`}>
              {formatDateTime(e.eventAtMs, timeZone)}
            </span>
          </div>
          <p className="text-muted">
            {labels[e.from] ?? e.from} → {labels[e.to] ?? e.to}
            {e.actor ? ` · by ${e.actor}` : ""}
          </p>
          {e.note ? <p className="mt-1">“{e.note}”</p> : null}
        </li>
      ))}
    </ol>
  );
}
