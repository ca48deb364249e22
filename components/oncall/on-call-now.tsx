import type { ShiftDto } from "@/lib/dto/oncall";
import { formatDateTime } from "@/lib/client/format";

// Who to call, at a glance on a phone: the shift on now and the one after it.

function Card({ title, shift, testId }: { title: string; shift: ShiftDto | null; testId: string }) {
  return (
    <div className="rounded-lg border border-line bg-panel p-4" data-testid={testId}>
      <h2 className="text-sm font-semibold uppercase text-muted">{title}</h2>
      {shift ? (
        <>
          <p className="mt-1 text-xl font-semibold">{shift.primaryName}</p>
          <p className="text-sm">Backup: {shift.backupName ?? "none"}</p>
          <p className="mt-1 text-sm text-muted">
            {formatDateTime(shift.startsAt)} – {formatDateTime(shift.endsAt)}
          </p>
        </>
      ) : (
        <p className="mt-1 text-alarm">Nobody on the rota: the admins are told instead.</p>
      )}
    </div>
  );
}

export function OnCallNow({ now, next }: { now: ShiftDto | null; next: ShiftDto | null }) {
  return (
    <div className="mb-6 grid gap-3 sm:grid-cols-2">
      <Card title="On call now" shift={now} testId="on-call-now" />
      <Card title="Next" shift={next} testId="on-call-next" />
    </div>
  );
}
