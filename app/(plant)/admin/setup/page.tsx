import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { setupProgress } from "@/db/queries/setup";
import { setupSteps } from "@/lib/setup-checklist";
import { getDb } from "@/lib/server/runtime";
import { requirePageViewer } from "../../../(auth)/auth";

export const metadata: Metadata = { title: "Set up" };
export const dynamic = "force-dynamic";

export default async function SetupPage() {
  const viewer = await requirePageViewer();
  const progress = setupProgress(getDb(), viewer);
  if (!progress) notFound();
  const steps = setupSteps(progress);
  const next = steps.find((s) => !s.done);
  return (
    <section className="max-w-prose">
      <h1 className="text-2xl font-semibold">Put a plant on Liftline</h1>
      <p className="mt-1 mb-4 text-sm text-muted">
        {next
          ? `${steps.filter((s) => s.done).length} of ${steps.length} done. Next: ${next.title.toLowerCase()}.`
          : "Every step is done. The board shows your sites."}
      </p>
      <ol className="space-y-3">
        {steps.map((s, i) => (
          <li key={s.key}>
            <Link
              href={s.href}
              className={`flex gap-3 rounded-lg border bg-panel p-4 hover:border-ink ${
                s === next ? "border-ink" : "border-line"
              }`}
            >
              <span
                aria-hidden
                className={`flex size-7 shrink-0 items-center justify-center rounded-full border text-sm ${
                  s.done ? "border-ink bg-ink text-panel" : "border-line"
                }`}
              >
                {s.done ? "✓" : i + 1}
              </span>
              <span>
                <span className="font-semibold">{s.title}</span>{" "}
                <span className="text-sm text-muted">{s.done ? "(done)" : "(to do)"}</span>
                <span className="mt-1 block text-sm text-muted">{s.text}</span>
              </span>
            </Link>
          </li>
        ))}
      </ol>
      {next ? null : (
        <p className="mt-4">
          <Link href="/" className="underline">
            Go to the board
          </Link>
        </p>
      )}
    </section>
  );
}
