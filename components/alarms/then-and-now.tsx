"use client";

import type { Measure } from "@/lib/quantities";
import { formatClock } from "@/lib/client/format";
import { formatDuration, formatValue, type UnitSystem } from "@/lib/units";
import { useSiteValues } from "@/components/realtime/use-site-values";
import { useNow } from "@/components/service/use-now";
import { formatNumber, numberLabel } from "./alarm-numbers";

type Value = number | boolean | string;

export interface EvidenceReading {
  pointId: number;
  label: string;
  measure: Measure;
  /** The reading when the alarm was raised (null: none stored near that time). */
  raised: { tsMs: number; value: Value } | null;
}

interface Words {
  atMs: number;
  message: string;
  numbers: Record<string, number | null>;
}

/**
 * What the alarm's readings and figures were when it was raised beside what they are now: the
 * readings live from the site's socket, the rule's figures as of its latest evaluation while active.
 */
export function ThenAndNow({
  siteId,
  raisedAtMs,
  raised,
  latest,
  active,
  readings,
  unitSystem,
  timeZone,
}: {
  siteId: string;
  raisedAtMs: number | null;
  raised: Words | null;
  latest: Words;
  active: boolean;
  readings: EvidenceReading[];
  unitSystem: UnitSystem;
  timeZone: string;
}) {
  const { latest: stored, pushed } = useSiteValues(siteId, 60_000, readings.length > 0);
  const nowMs = useNow(5_000);
  const byId = new Map((stored?.points ?? []).map((p) => [p.pointId, p]));
  const nowOf = (pointId: number): { tsMs: number; value: Value } | null => {
    const live = pushed[pointId];
    const s = byId.get(pointId);
    const fromStore = s && s.tsMs !== null && s.value !== null ? { tsMs: s.tsMs, value: s.value } : null;
    if (live && (!fromStore || live.tsMs >= fromStore.tsMs)) return live;
    return fromStore;
  };
  const keys = [...new Set([...Object.keys(raised?.numbers ?? {}), ...Object.keys(latest.numbers)])].filter(
    (k) => raised?.numbers[k] != null || latest.numbers[k] != null,
  );
  const raisedClock = raisedAtMs !== null ? formatClock(raisedAtMs, timeZone) : null;
  const changedWords = raised && raised.message !== latest.message;
  if (!readings.length && !keys.length) return null;
  return (
    <section aria-labelledby="then-and-now" className="flex flex-col gap-2" data-testid="then-and-now">
      <h2 id="then-and-now" className="text-lg font-semibold">
        When raised and now
      </h2>
      {changedWords ? (
        <p className="text-sm" data-testid="raised-words">
          <span className="text-muted">When raised{raisedClock ? ` (${raisedClock})` : ""}:</span> {raised.message}
        </p>
      ) : null}
      <div className="overflow-x-auto">
        <table className="w-full text-sm tabular-nums">
          <thead>
            <tr className="text-left text-muted">
              <th scope="col" className="py-1 pr-3 font-normal">
                Reading
              </th>
              <th scope="col" className="py-1 pr-3 font-normal">
                When raised{raisedClock ? ` · ${raisedClock}` : ""}
              </th>
              <th scope="col" className="py-1 font-normal">
                Now
              </th>
            </tr>
          </thead>
          <tbody>
            {readings.map((r) => {
              const now = nowOf(r.pointId);
              return (
                <tr key={r.pointId} className="border-t border-line/60" data-testid="then-now-reading">
                  <th scope="row" className="py-1 pr-3 text-left font-normal">
                    {r.label}
                  </th>
                  <td className="py-1 pr-3" data-testid="raised-value">
                    {r.raised ? formatValue(r.raised.value, r.measure, unitSystem) : "—"}
                  </td>
                  <td className="py-1 font-semibold" data-testid="now-value">
                    {now ? formatValue(now.value, r.measure, unitSystem) : "—"}
                    {now ? (
                      <span className="ml-1 text-xs font-normal text-muted">
                        {formatDuration(Math.max(0, (nowMs - now.tsMs) / 1000))} ago
                      </span>
                    ) : null}
                  </td>
                </tr>
              );
            })}
          </tbody>
          {keys.length ? (
            <tbody>
              <tr className="border-t-2 border-line">
                <th colSpan={3} scope="rowgroup" className="pt-2 text-left text-xs font-semibold text-muted">
                  The rule&apos;s figures — {active ? "latest" : "last while active"} at{" "}
                  {formatClock(latest.atMs, timeZone)}
                </th>
              </tr>
              {keys.map((k) => (
                <tr key={k} className="border-t border-line/60" data-testid="then-now-number" data-number={k}>
                  <th scope="row" className="py-1 pr-3 text-left font-normal">
                    {numberLabel(k)}
                  </th>
                  <td className="py-1 pr-3">
                    {raised ? formatNumber(k, raised.numbers[k] ?? null, unitSystem, timeZone) : "—"}
                  </td>
                  <td className="py-1 font-semibold">
                    {formatNumber(k, latest.numbers[k] ?? null, unitSystem, timeZone)}
                  </td>
                </tr>
              ))}
            </tbody>
          ) : null}
        </table>
      </div>
    </section>
  );
}
