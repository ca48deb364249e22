"use client";

import { useState } from "react";
import { useQuantityText } from "@/components/layout/unit-system";
import Link from "next/link";
import useSWR from "swr";
import { fetchJson } from "@/lib/client/fetcher";
import { DRILL_CAUTION } from "@/lib/drills/controls";
import type { DrillCommandBody } from "@/lib/schemas/drills";
import { drillTimerLimits } from "@/lib/schemas/drills";
import type { DrillDto } from "@/lib/dto/drills";
import { Button } from "@/components/ui/button";

interface Live {
  running: boolean;
  simulatedMs: number | null;
  endsAtMs: number;
  events: Array<{ tsMs: number; kind: string; equipment: string | null; message: string }>;
  advice: Array<{ equipment: string; title: string; advice: string[] }> | null;
  equipment: { chillers: string[]; airHandlers: string[]; tower: string };
}

/**
 * The trainee's commands to a training site's simulated plant, shown on the site page while a drill runs
 * there (nothing otherwise). With hints on, the rules' current advice is shown beside the controls.
 */
export function DrillControls({ siteId }: { siteId: string }) {
  // Advice comes with its numbers as quantity tokens: shown in the viewer's units.
  const words = useQuantityText();
  const { data: list } = useSWR<{ drills: DrillDto[] }>(`/api/drills?siteId=${encodeURIComponent(siteId)}`, fetchJson, {
    refreshInterval: 5000,
  });
  const drill = list?.drills.find((d) => d.state === "running");
  const { data } = useSWR<{ drill: DrillDto; live: Live | null }>(drill ? `/api/drills/${drill.id}` : null, fetchJson, {
    refreshInterval: 2000,
  });
  const [message, setMessage] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const [timers, setTimers] = useState<Record<string, number>>({ "start-to-start": 120, "stop-to-start": 60 });
  if (!drill) {
    const last = list?.drills[0];
    return last ? (
      <section aria-label="Drill" className="mb-4 rounded border border-line bg-panel p-3 text-sm">
        Last drill here:{" "}
        <Link href={`/drills/${last.id}`} className="underline">
          debrief ({last.outcome ?? last.state})
        </Link>
      </section>
    ) : null;
  }
  const live = data?.live;

  async function send(action: DrillCommandBody) {
    setBusy(true);
    setMessage(null);
    try {
      const r = await fetchJson<{ step: { text: string } }>(`/api/drills/${drill!.id}/commands`, {
        method: "POST",
        body: JSON.stringify(action),
      });
      setMessage(`Sent: ${r.step.text}`);
    } catch (err) {
      setMessage(err instanceof Error ? err.message : String(err));
    } finally {
      setBusy(false);
    }
  }

  const eq = live?.equipment ?? { chillers: ["CH-1"], airHandlers: [], tower: "CT-1" };
  return (
    <section aria-labelledby="drill-controls-title" className="mb-4 rounded border border-line bg-panel p-3">
      <h2 id="drill-controls-title" className="text-lg font-semibold">
        Drill controls — {drill.scenario} at {drill.speed}×, trainee {drill.traineeName}
      </h2>
      <p className="text-sm text-muted">
        {live?.simulatedMs
          ? `Plant time ${new Date(live.simulatedMs).toLocaleTimeString([], { timeZone: drill.siteTimeZone })}`
          : "Starting…"}{" "}
        ·{" "}
        <Link href={`/drills/${drill.id}`} className="underline">
          Debrief page
        </Link>
      </p>
      <p role="note" className="my-2 text-sm text-muted">
        {DRILL_CAUTION}
      </p>
      <div className="grid gap-3 sm:grid-cols-2">
        <fieldset className="flex flex-wrap gap-2" disabled={busy}>
          <legend className="mb-1 text-sm font-semibold">Tower fan drive {eq.tower}</legend>
          <Button
            variant="secondary"
            onClick={() => send({ type: "set-fan-drive-mode", equipment: eq.tower, mode: "auto" })}
          >
            Fan to auto
          </Button>
          <Button
            variant="secondary"
            onClick={() => send({ type: "set-fan-drive-mode", equipment: eq.tower, mode: "off" })}
          >
            Fan off
          </Button>
        </fieldset>
        <fieldset className="flex flex-wrap gap-2" disabled={busy}>
          <legend className="mb-1 text-sm font-semibold">Air handlers</legend>
          {eq.airHandlers.map((tag) => (
            <span key={tag} className="inline-flex gap-1">
              <Button variant="secondary" onClick={() => send({ type: "set-air-handler", equipment: tag, run: false })}>
                Shed {tag}
              </Button>
              <Button variant="secondary" onClick={() => send({ type: "set-air-handler", equipment: tag, run: true })}>
                Restore {tag}
              </Button>
            </span>
          ))}
        </fieldset>
        {eq.chillers.map((tag) => (
          <fieldset key={tag} className="flex flex-wrap items-end gap-2" disabled={busy}>
            <legend className="mb-1 text-sm font-semibold">Chiller {tag}</legend>
            <Button variant="secondary" onClick={() => send({ type: "reset-alarm", equipment: tag })}>
              Reset latched trip
            </Button>
            <Button
              variant="secondary"
              onClick={() => send({ type: "set-chiller-enable", equipment: tag, enabled: true })}
            >
              Start chiller
            </Button>
            {(["start-to-start", "stop-to-start"] as const).map((timer) => (
              <label key={timer} className="flex flex-col text-sm">
                {timer} timer, s ({drillTimerLimits[timer].min}–{drillTimerLimits[timer].max})
                <span className="flex gap-1">
                  <input
                    type="number"
                    min={drillTimerLimits[timer].min}
                    max={drillTimerLimits[timer].max}
                    value={timers[timer]}
                    onChange={(e) => setTimers({ ...timers, [timer]: Number(e.target.value) })}
                    className="w-24 rounded border border-line bg-surface px-2"
                  />
                  <Button
                    variant="secondary"
                    onClick={() =>
                      send({ type: "set-anti-recycle-timer", equipment: tag, timer, seconds: timers[timer] })
                    }
                  >
                    Set
                  </Button>
                </span>
              </label>
            ))}
          </fieldset>
        ))}
      </div>
      {message ? (
        <p role="status" className="mt-2 text-sm">
          {message}
        </p>
      ) : null}
      {live?.advice ? (
        <div className="mt-3 border-t border-line pt-2">
          <h3 className="text-sm font-semibold">Hint: what the rules advise now</h3>
          {live.advice.length === 0 ? <p className="text-sm text-muted">No active alarm with advice.</p> : null}
          {live.advice.map((a) => (
            <div key={`${a.equipment}-${a.title}`} className="mt-1 text-sm">
              <p className="font-semibold">
                {a.equipment}: {words(a.title)}
              </p>
              <ul className="list-disc pl-5">
                {a.advice.map((s) => (
                  <li key={s}>{words(s)}</li>
                ))}
              </ul>
            </div>
          ))}
        </div>
      ) : null}
      {live ? (
        <details className="mt-2 text-sm">
          <summary>Plant events ({live.events.length})</summary>
          <ul>
            {live.events.slice(-12).map((e, i) => (
              <li key={`${e.tsMs}-${i}`}>
                {new Date(e.tsMs).toLocaleTimeString([], { timeZone: drill.siteTimeZone })} {e.equipment ?? ""}{" "}
                {e.message}
              </li>
            ))}
          </ul>
        </details>
      ) : null}
    </section>
  );
}
