import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { drillPeople, listDrills, listSavedScenarios, listTrainingSites, canStartDrills } from "@/db/queries/drills";
import { StartDrillForm } from "@/components/drills/start-drill-form";
import { isAdmin } from "@/lib/auth/viewer";
import { getDb } from "@/lib/server/runtime";
import { requirePageViewer } from "../../(auth)/auth";

export const metadata: Metadata = { title: "Drills" };
export const dynamic = "force-dynamic";

const outcomeText = {
  avoided: "Crossover avoided",
  crossed: "Loops crossed",
  timed_out: "Ran out of time",
  stopped: "Stopped",
};

/** Drill results per trainee for the supervisor, and starting a new one. */
export default async function DrillsPage({ searchParams }: { searchParams: Promise<{ trainee?: string }> }) {
  const viewer = await requirePageViewer();
  if (viewer.role === "customer") notFound();
  const db = getDb();
  const trainee = (await searchParams).trainee;
  const people = drillPeople(db, viewer);
  const drills = listDrills(db, viewer, { traineeId: trainee || undefined });
  return (
    <article>
      <h1 className="mb-4 text-2xl font-semibold">Drills</h1>
      {canStartDrills(viewer) ? (
        <StartDrillForm
          sites={listTrainingSites(db, viewer)}
          people={people}
          saved={listSavedScenarios(db, viewer)}
          admin={isAdmin(viewer)}
        />
      ) : null}
      <form className="mb-3 flex flex-wrap items-end gap-2 text-sm" method="get">
        <label className="flex flex-col">
          Trainee
          <select
            name="trainee"
            defaultValue={trainee ?? ""}
            className="min-h-11 rounded border border-line bg-surface px-2"
          >
            <option value="">Everyone</option>
            {people.map((p) => (
              <option key={p.id} value={p.id}>
                {p.name}
              </option>
            ))}
          </select>
        </label>
        <button type="submit" className="min-h-11 rounded border border-line bg-panel px-4 font-semibold">
          Show
        </button>
      </form>
      {drills.length === 0 ? <p className="text-muted">No drills yet.</p> : null}
      <ul className="flex flex-col gap-2">
        {drills.map((d) => (
          <li key={d.id} className="rounded border border-line bg-panel p-3 text-sm">
            <Link href={`/drills/${d.id}`} className="font-semibold underline">
              {d.traineeName}: {d.scenario} at {d.speed}×
            </Link>{" "}
            —{" "}
            {d.state === "running" ? "running" : `${outcomeText[d.outcome ?? "stopped"]}, score ${d.scorePct ?? "—"} %`}
            <span className="block text-muted">
              {d.siteName} · started by {d.startedByName} ·{" "}
              {new Date(d.createdAt).toLocaleString("en-US", { timeZone: d.siteTimeZone })}
              {d.hints ? " · hints on" : ""}
            </span>
          </li>
        ))}
      </ul>
    </article>
  );
}
