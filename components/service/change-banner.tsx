"use client";

import Link from "next/link";
import useSWR from "swr";
import type { TemporaryChangeDto } from "@/lib/dto/service";
import { fetchJson } from "@/lib/client/fetcher";
import { useNow } from "./use-now";
import { CHANGE_CAUTION, formatClock, inPlaceFor } from "@/lib/service/changes";

/**
 * Temporary changes in place on a site: for staff what was changed, how long ago and by when it
 * goes back; for the customer the plain-words sentence. Shown on the site and alarm pages.
 */
export function TemporaryChangeBanner({
  siteId,
  staff,
  timeZone,
  initial,
}: {
  siteId: string;
  staff: boolean;
  timeZone: string;
  initial?: TemporaryChangeDto[];
}) {
  const { data } = useSWR<{ changes: TemporaryChangeDto[] }>(`/api/sites/${siteId}/temporary-changes`, fetchJson, {
    fallbackData: initial ? { changes: initial } : undefined,
    refreshInterval: 30_000,
  });
  const now = useNow();
  const changes = data?.changes ?? [];
  if (changes.length === 0) return null;
  return (
    <section
      aria-label="Temporary changes in place"
      className="mb-4 rounded-lg border-2 border-warning bg-warning/10 p-3"
      data-testid="change-banner"
    >
      <h2 className="font-semibold">
        {changes.length === 1 ? "A temporary change is in place" : `${changes.length} temporary changes are in place`}
      </h2>
      <ul className="mt-2 flex flex-col gap-2">
        {changes.map((c) => {
          const overdue = c.putBackDueAt < now;
          return (
            <li key={c.id} className="text-sm leading-snug" data-testid="change-in-place">
              {staff ? (
                <>
                  <span className="font-semibold">
                    {c.equipmentTag ? `${c.equipmentTag} ` : ""}
                    {c.what}: {c.fromValue} → {c.toValue}
                  </span>{" "}
                  — in place for {inPlaceFor(c.madeAt, now)}, put back by{" "}
                  <span className={overdue ? "font-semibold text-alarm" : ""}>
                    {formatClock(c.putBackDueAt, timeZone, now)}
                    {overdue ? " (overdue)" : ""}
                  </span>
                  .{" "}
                  <Link href={`/visits/${c.visitId}`} className="underline">
                    Visit
                  </Link>
                  {c.liveCheck ? <span className="block text-muted">{c.liveCheck.message}</span> : null}
                </>
              ) : (
                <span data-testid="change-plain">{c.plainText}</span>
              )}
            </li>
          );
        })}
      </ul>
      {staff ? <p className="mt-2 text-xs text-muted">{CHANGE_CAUTION}</p> : null}
    </section>
  );
}
