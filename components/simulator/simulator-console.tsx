"use client";

import { useState } from "react";
import useSWR from "swr";
import type { SimulatedSiteStatus } from "@/lib/dto/simulator";
import { Button } from "@/components/ui/button";
import { fetchJson } from "@/lib/client/fetcher";
import { formatDateTime } from "@/lib/client/format";
import { formatDuration } from "@/lib/units";

type Data = {
  sites: SimulatedSiteStatus[];
  scenarios: Array<{ name: string; description: string; durationS: number }>;
};
type Drill = { label: string; actions: object[] };

function drillsFor(layout: string): Drill[] {
  const ahus = layout === "data-hall" ? 6 : layout === "medical-office" ? 3 : 4;
  return [
    { label: "Tower fan drive → auto", actions: [{ type: "set-fan-drive-mode", equipment: "CT-1", mode: "auto" }] },
    { label: "Reset CH-1 latched alarm", actions: [{ type: "reset-alarm", equipment: "CH-1" }] },
    {
      label: "CH-1 anti-recycle timers → minimum",
      actions: [
        { type: "set-anti-recycle-timer", equipment: "CH-1", timer: "start-to-start", seconds: 120 },
        { type: "set-anti-recycle-timer", equipment: "CH-1", timer: "stop-to-start", seconds: 60 },
      ],
    },
    {
      label: "Shed air handlers (all but AHU-1)",
      actions: Array.from({ length: ahus - 1 }, (_, i) => ({
        type: "set-air-handler",
        equipment: `AHU-${i + 2}`,
        run: false,
      })),
    },
    {
      label: "Air handlers back on",
      actions: Array.from({ length: ahus - 1 }, (_, i) => ({
        type: "set-air-handler",
        equipment: `AHU-${i + 2}`,
        run: true,
      })),
    },
  ];
}

export function SimulatorConsole() {
  const { data, error, mutate } = useSWR<Data>("/api/simulator", fetchJson, { refreshInterval: 2000 });
  const [message, setMessage] = useState<string | null>(null);

  async function start(siteId: string, form: HTMLFormElement) {
    const fd = new FormData(form);
    setMessage(null);
    try {
      await fetchJson(`/api/simulator/${siteId}`, {
        method: "POST",
        body: JSON.stringify({ scenario: fd.get("scenario"), speed: Number(fd.get("speed")) }),
      });
      await mutate();
    } catch (err) {
      setMessage((err as Error).message);
    }
  }

  async function drill(siteId: string, d: Drill) {
    setMessage(null);
    try {
      for (const action of d.actions)
        await fetchJson(`/api/simulator/${siteId}/drill`, { method: "POST", body: JSON.stringify(action) });
      setMessage(`Sent: ${d.label}. The simulated controller accepts or refuses it and logs why.`);
    } catch (err) {
      setMessage((err as Error).message);
    }
  }

  if (error) return <p className="text-alarm">{error.message}</p>;
  return (
    <div className="flex flex-col gap-4">
      <p className="rounded border border-warning/40 bg-warning/5 px-3 py-2 text-sm">
        Drills act on simulated plants only; Liftline never writes to real controllers. On real equipment, safety
        timers, resets and restarts are for qualified technicians following the manufacturer&apos;s procedures and local
        codes.
      </p>
      {message ? (
        <p role="status" className="text-sm">
          {message}
        </p>
      ) : null}
      {(data?.sites ?? []).map((s) => (
        <section key={s.siteId} className="rounded-lg border border-line bg-panel p-4" data-testid="sim-site">
          <h2 className="font-semibold">{s.siteName}</h2>
          {s.run ? (
            <div className="mt-1 text-sm">
              <p>
                <strong>{s.run.scenario}</strong> at {s.run.speed}× · pass {s.run.pass} ·{" "}
                {s.run.connected ? "connected" : "connecting…"}
              </p>
              <div
                className="mt-2 h-2 w-full rounded bg-surface"
                role="progressbar"
                aria-valuemin={0}
                aria-valuemax={100}
                aria-valuenow={Math.round(s.run.fractionDone * 100)}
                aria-label="Scenario progress"
              >
                <div className="h-2 rounded bg-ink" style={{ width: `${Math.min(100, s.run.fractionDone * 100)}%` }} />
              </div>
              <p className="mt-1 text-muted">
                {Math.round(s.run.fractionDone * 100)} % · simulated {formatDuration(s.run.simulatedS)} of{" "}
                {formatDuration(s.run.durationS)} · plant clock {formatDateTime(s.run.simulatedMs)}
              </p>
              {s.run.recentEvents.length ? (
                <details className="mt-2">
                  <summary className="cursor-pointer">Recent plant events ({s.run.recentEvents.length})</summary>
                  <ul className="mt-1 max-h-48 overflow-y-auto font-mono text-xs">
                    {[...s.run.recentEvents].reverse().map((e, i) => (
                      <li key={i}>
                        {formatDateTime(e.tsMs)} {e.kind} {e.equipment ?? ""}: {e.message}
                      </li>
                    ))}
                  </ul>
                </details>
              ) : null}
            </div>
          ) : (
            <p className="mt-1 text-sm text-muted">Not running</p>
          )}
          <form
            className="mt-3 flex flex-wrap items-end gap-2"
            onSubmit={(e) => {
              e.preventDefault();
              void start(s.siteId, e.currentTarget);
            }}
          >
            <label className="flex flex-col text-sm">
              Scenario
              <select
                name="scenario"
                className="min-h-11 rounded border border-line bg-panel px-2"
                defaultValue={s.run?.scenario ?? "power-blip"}
              >
                {(data?.scenarios ?? []).map((sc) => (
                  <option key={sc.name} value={sc.name} title={sc.description}>
                    {sc.name} ({formatDuration(sc.durationS)})
                  </option>
                ))}
              </select>
            </label>
            <label className="flex flex-col text-sm">
              Speed (×)
              <input
                name="speed"
                type="number"
                min={1}
                max={120}
                defaultValue={20}
                className="min-h-11 w-24 rounded border border-line bg-panel px-2"
              />
            </label>
            <Button type="submit">Start</Button>
          </form>
          <p className="mt-1 text-xs text-muted">
            Starting replays the scenario so it ends now; this site&apos;s simulated readings from its start on are
            replaced and its alarms reset.
          </p>
          {s.run ? (
            <div className="mt-3 flex flex-wrap gap-2" aria-label="Drills">
              {drillsFor(s.layout).map((d) => (
                <Button key={d.label} variant="secondary" type="button" onClick={() => void drill(s.siteId, d)}>
                  {d.label}
                </Button>
              ))}
            </div>
          ) : null}
        </section>
      ))}
    </div>
  );
}
