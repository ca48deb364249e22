"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import { Button } from "@/components/ui/button";
import { fetchJson } from "@/lib/client/fetcher";
import type { VisitDto } from "@/lib/dto/service";

/** Opens a visit (from an alarm, or planned on a site), remote or on site, and goes to it. */
export function OpenVisitButton({ alarmId, siteId }: { alarmId?: string; siteId?: string }) {
  const router = useRouter();
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const open = async (mode: "on_site" | "remote") => {
    setBusy(true);
    setError(null);
    try {
      const { visit } = await fetchJson<{ visit: VisitDto }>("/api/visits", {
        method: "POST",
        body: JSON.stringify(alarmId ? { alarmId, mode } : { siteId, mode }),
      });
      router.push(`/visits/${visit.id}`);
    } catch (err) {
      setError((err as Error).message);
      setBusy(false);
    }
  };
  return (
    <div className="flex flex-col gap-1">
      <div className="flex flex-wrap gap-2">
        <Button type="button" disabled={busy} onClick={() => void open("on_site")} data-testid="open-visit">
          Open a visit (on site)
        </Button>
        <Button type="button" variant="secondary" disabled={busy} onClick={() => void open("remote")}>
          Open a remote visit
        </Button>
      </div>
      {error ? <p className="text-sm text-alarm">{error}</p> : null}
    </div>
  );
}
