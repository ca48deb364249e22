import { priorityMeanings, type Priority } from "@/lib/alarms/priority";

// Colour is for abnormal states only, strongest for the most urgent priority.
const styles: Record<Priority, string> = {
  1: "bg-critical text-on-strong",
  2: "bg-alarm text-on-strong",
  3: "bg-warning text-on-strong",
  4: "border border-line bg-panel text-ink",
};

export function PriorityBadge({ priority }: { priority: number }) {
  const p = (priority >= 1 && priority <= 4 ? priority : 4) as Priority;
  return (
    <span
      className={`inline-flex items-center rounded px-2 py-0.5 text-xs font-semibold uppercase tracking-wide ${styles[p]}`}
      title={priorityMeanings[p].response}
    >
      {priorityMeanings[p].label}
    </span>
  );
}

export const stateLabel: Record<string, string> = {
  normal: "Normal",
  unacknowledged: "Unacknowledged",
  acknowledged: "Acknowledged",
  returned_unacknowledged: "Cleared, not acknowledged",
  latched: "Latched",
  shelved: "Shelved",
  suppressed_by_design: "Suppressed by design",
  out_of_service: "Out of service",
};

/** What a building owner is told about the state, in plain words. */
export const ownerStateLabel: Record<string, string> = {
  normal: "Resolved",
  unacknowledged: "Service team alerted",
  acknowledged: "A technician is on it",
  returned_unacknowledged: "Cleared on its own; the service team will review it",
  latched: "Waiting for a technician to reset it",
  shelved: "Under review by the service team",
  suppressed_by_design: "Not applicable right now",
  out_of_service: "Taken out of service by the service team",
};
