import type { DeliveryDto } from "@/lib/dto/notify";
import { formatDateTime } from "@/lib/client/format";
import { pathLabel } from "@/lib/notify/policy";

// Who was told about the alarm, how, and what became of it: part of the alarm's history.

const stepName: Record<number, string> = { 0: "primary", 1: "backup", 2: "admin" };
const statusClass: Record<DeliveryDto["status"], string> = {
  sent: "text-ink",
  delivered: "text-ink",
  failed: "text-alarm",
  acknowledged: "font-semibold text-ink",
};

export function AlarmDeliveries({ deliveries, timeZone }: { deliveries: DeliveryDto[]; timeZone: string }) {
  if (deliveries.length === 0) return <p className="text-sm text-muted">Nobody has been notified of this alarm.</p>;
  return (
    <ul className="flex flex-col gap-2" data-testid="alarm-deliveries">
      {deliveries.map((d) => (
        <li
          key={d.id}
          className="rounded border border-line bg-panel p-3 text-sm"
          data-path={d.path}
          data-status={d.status}
        >
          <span className="text-muted">{formatDateTime(d.sentAt, timeZone)}</span> · {pathLabel[d.path]} to {d.person} (
          {stepName[d.step] ?? d.step}) · <span className={statusClass[d.status]}>{d.status}</span>
          {d.status !== "sent" ? ` at ${formatDateTime(d.statusAt, timeZone)}` : ""}
          {d.detail ? <span className="text-muted"> — {d.detail}</span> : null}
        </li>
      ))}
    </ul>
  );
}
