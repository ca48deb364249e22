"use client";

import { useState } from "react";
import { useRouter } from "next/navigation";
import { fetchJson } from "@/lib/client/fetcher";
import { builtInDrillScenarios, drillSpeeds, trainingLayouts } from "@/lib/schemas/drills";
import type { DrillPersonDto, SavedScenarioDto, TrainingSiteDto } from "@/lib/dto/drills";
import { Button } from "@/components/ui/button";

const field = "min-h-11 rounded border border-line bg-surface px-2";

/** Start a drill for a trainee (admins and senior technicians), and for admins, add a training site. */
export function StartDrillForm({
  sites,
  people,
  saved,
  admin,
}: {
  sites: TrainingSiteDto[];
  people: DrillPersonDto[];
  saved: SavedScenarioDto[];
  admin: boolean;
}) {
  const router = useRouter();
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  async function post(url: string, body: unknown, then: (r: Record<string, { id: string }>) => void) {
    setBusy(true);
    setError(null);
    try {
      then(await fetchJson(url, { method: "POST", body: JSON.stringify(body) }));
    } catch (err) {
      setError(err instanceof Error ? err.message : String(err));
    } finally {
      setBusy(false);
    }
  }

  return (
    <section aria-labelledby="start-drill-title" className="mb-6 rounded border border-line bg-panel p-3">
      <h2 id="start-drill-title" className="text-lg font-semibold">
        Start a drill
      </h2>
      {sites.length === 0 ? (
        <p className="text-sm text-muted">No training site yet{admin ? ": add one below." : "."}</p>
      ) : null}
      <form
        className="mt-2 grid gap-2 sm:grid-cols-3"
        onSubmit={(e) => {
          e.preventDefault();
          const f = new FormData(e.currentTarget);
          void post(
            "/api/drills",
            {
              siteId: f.get("siteId"),
              traineeId: f.get("traineeId"),
              scenario: f.get("scenario"),
              speed: Number(f.get("speed")),
              hints: f.get("hints") === "on",
            },
            () => router.push(`/sites/${String(f.get("siteId"))}#drill-controls-title`),
          );
        }}
      >
        <label className="flex flex-col text-sm">
          Training site
          <select name="siteId" className={field} required>
            {sites.map((s) => (
              <option key={s.id} value={s.id}>
                {s.name} ({s.layout}, {s.protocol === "sparkplug" ? "Sparkplug B" : "JSON"})
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col text-sm">
          Trainee
          <select name="traineeId" className={field} required>
            {people.map((p) => (
              <option key={p.id} value={p.id}>
                {p.name}
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col text-sm">
          Scenario
          <select name="scenario" className={field}>
            {builtInDrillScenarios.map((s) => (
              <option key={s} value={s}>
                {s}
              </option>
            ))}
            {saved.map((s) => (
              <option key={s.id} value={`saved:${s.id}`}>
                Saved: {s.name} ({s.base})
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col text-sm">
          Speed
          <select name="speed" className={field} defaultValue="60">
            {drillSpeeds.map((s) => (
              <option key={s} value={s}>
                {s}×
              </option>
            ))}
          </select>
        </label>
        <label className="flex items-center gap-2 text-sm">
          <input type="checkbox" name="hints" defaultChecked className="size-5" /> Show hints (the rules&apos; advice)
        </label>
        <Button type="submit" disabled={busy || sites.length === 0}>
          Start drill
        </Button>
      </form>
      {admin ? (
        <form
          className="mt-4 grid gap-2 border-t border-line pt-3 sm:grid-cols-4"
          onSubmit={(e) => {
            e.preventDefault();
            const f = new FormData(e.currentTarget);
            void post(
              "/api/training-sites",
              { name: f.get("name"), layout: f.get("layout"), protocol: f.get("protocol") },
              () => router.refresh(),
            );
          }}
        >
          <label className="flex flex-col text-sm">
            New training site name
            <input name="name" required maxLength={120} className={field} />
          </label>
          <label className="flex flex-col text-sm">
            Plant layout
            <select name="layout" className={field}>
              {trainingLayouts.map((l) => (
                <option key={l}>{l}</option>
              ))}
            </select>
          </label>
          <label className="flex flex-col text-sm">
            Gateway
            <select name="protocol" className={field}>
              <option value="json">JSON over MQTT</option>
              <option value="sparkplug">Sparkplug B edge node</option>
            </select>
          </label>
          <Button type="submit" variant="secondary" disabled={busy}>
            Add training site
          </Button>
        </form>
      ) : null}
      {error ? (
        <p role="alert" className="mt-2 text-sm text-alarm">
          Error: {error}
        </p>
      ) : null}
    </section>
  );
}
