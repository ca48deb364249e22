"use client";

import Link from "next/link";
import { useRouter } from "next/navigation";
import useSWR from "swr";
import type { AlarmDto, AlarmWithHistoryDto } from "@/lib/dto/alarms";
import { fetchJson } from "@/lib/client/fetcher";
import { formatDateTime } from "@/lib/client/format";
import type { UnitSystem } from "@/lib/units";
import { AlarmActions } from "./alarm-actions";
import { AlarmNumbers } from "./alarm-numbers";
import { ownerStateLabel, PriorityBadge, stateLabel } from "./priority";

const frame: Record<number, string> = {
  1: "border-critical",
  2: "border-alarm",
  3: "border-warning",
  4: "border-line",
};

/** One alarm with its numbers, advice and caution; staff act on it, owners read it in plain words. */
export function AlarmCard({
  alarm,
  canAct,
  unitSystem,
  timeZone,
  onChanged,
  showNumbers = true,
}: {
  alarm: AlarmDto;
  canAct: boolean;
  unitSystem: UnitSystem;
  timeZone: string;
  onChanged?: () => void;
  /** False where the page sets the numbers beside their values when raised instead (the alarm page). */
  showNumbers?: boolean;
}) {
  const router = useRouter();
  const { data, mutate } = useSWR<{ alarm: AlarmWithHistoryDto }>(`/api/alarms/${alarm.id}`, fetchJson);
  const notes = data?.alarm.notes ?? [];
  const d = alarm.detail;
  const active = alarm.conditionActive;
  return (
    <article
      className={`rounded-lg border-2 bg-panel p-4 ${active ? frame[alarm.priority] : "border-line"}`}
      data-testid="alarm-card"
      data-rule={alarm.ruleId}
      data-state={alarm.state}
    >
      <header className="flex flex-wrap items-center gap-2">
        <PriorityBadge priority={alarm.priority} />
        <span className="text-sm font-semibold">{alarm.equipment}</span>
        <span className="text-sm text-muted" data-testid="alarm-state">
          {canAct ? stateLabel[alarm.state] : ownerStateLabel[alarm.state]}
        </span>
        <span className="ml-auto text-xs text-muted">as of {formatDateTime(d.atMs, timeZone)} site time</span>
      </header>
      <h3 className="mt-2 text-lg font-semibold leading-snug">
        <Link href={`/alarms/${alarm.id}`} className="hover:underline">
          {canAct ? d.technicianMessage : d.ownerMessage || d.technicianMessage}
        </Link>
      </h3>
      {canAct ? (
        <>
          {showNumbers ? (
            <div className="mt-3">
              <AlarmNumbers numbers={d.numbers} unitSystem={unitSystem} timeZone={timeZone} />
            </div>
          ) : null}
          {d.advice.length ? (
            <div className="mt-3">
              <h4 className="text-sm font-semibold">What to consider</h4>
              <ol className="mt-1 list-decimal pl-5 text-sm">
                {d.advice.map((a) => (
                  <li key={a}>{a}</li>
                ))}
              </ol>
            </div>
          ) : null}
          {d.related.length ? <p className="mt-2 text-sm text-muted">Related: {d.related.join("; ")}</p> : null}
          {d.caution ? (
            <p className="mt-3 rounded border border-warning/40 bg-warning/5 px-3 py-2 text-sm" data-testid="caution">
              <strong>Caution:</strong> {d.caution}
            </p>
          ) : null}
        </>
      ) : null}
      {notes.length ? (
        <ul className="mt-3 flex flex-col gap-1 text-sm" aria-label="Notes">
          {notes.map((n) => (
            <li key={n.id} className="rounded bg-surface px-3 py-2" data-testid="alarm-note">
              <span className="font-semibold">{n.author}</span>
              {canAct ? (
                <span className="text-muted"> · {n.visibility === "customer" ? "shared with owner" : "internal"}</span>
              ) : null}
              : {n.text}
            </li>
          ))}
        </ul>
      ) : null}
      {canAct ? (
        <div className="mt-3 border-t border-line pt-3">
          <AlarmActions
            alarmId={alarm.id}
            state={alarm.state}
            onDone={() => {
              void mutate();
              if (onChanged) onChanged();
              else router.refresh();
            }}
          />
        </div>
      ) : null}
    </article>
  );
}
