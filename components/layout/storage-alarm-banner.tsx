"use client";

import useSWR from "swr";
import { formatDateTime } from "@/lib/client/format";
import { storageProblemText, type StorageFailureKind } from "@/lib/storage-messages";

/** The storage part of /api/health's answer, present only while the database cannot be written. */
export interface StorageAlarm {
  kind: StorageFailureKind;
  reason: string;
  since: string;
}

const POLL_MS = 15_000;

async function fetchStorage(url: string): Promise<StorageAlarm | null> {
  const body = (await (await fetch(url, { cache: "no-store" })).json()) as { storage?: StorageAlarm };
  return body.storage ?? null;
}

// The system alarm for storage on every staff page while the server cannot write its database.
// The layout renders it with the state at page load; it keeps asking, since the layout itself
// is not rendered again on navigation.
export function StorageAlarmBanner({ initial }: { initial: StorageAlarm | null }) {
  const { data } = useSWR("/api/health", fetchStorage, { fallbackData: initial, refreshInterval: POLL_MS });
  if (!data) return null;
  return (
    <div role="alert" data-testid="storage-alarm" className="border-b border-alarm/40 bg-alarm/5 text-alarm">
      <div className="mx-auto max-w-6xl px-4 py-2 text-sm">
        <p className="font-semibold">System alarm: {storageProblemText(data.kind)}</p>
        <p className="text-ink">
          Since {formatDateTime(Date.parse(data.since))} · {data.reason}. The admins have been e-mailed; Liftline
          recovers on its own once writes succeed again.
        </p>
      </div>
    </div>
  );
}
