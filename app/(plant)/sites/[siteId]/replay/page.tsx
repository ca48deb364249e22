import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { getDb } from "@/lib/server/runtime";
import { getSite } from "@/db/queries/sites";
import { replayQuerySchema, replayWindow } from "@/lib/schemas/replay";
import { ReplayPlayer } from "@/components/replay/replay-player";
import { requirePageViewer } from "../../../../(auth)/auth";

export const dynamic = "force-dynamic";

type Props = {
  params: Promise<{ siteId: string }>;
  searchParams: Promise<Record<string, string | string[] | undefined>>;
};

export async function generateMetadata({ params }: Props): Promise<Metadata> {
  const viewer = await requirePageViewer();
  const site = getSite(getDb(), viewer, (await params).siteId);
  return { title: site ? `Replay · ${site.name}` : "Not found" };
}

/** The window `?from&to` asks for; a bad or too long one falls back to the last hour, said so on the page. */
function windowOf(raw: Record<string, string | string[] | undefined>) {
  const now = Date.now();
  const query = replayQuerySchema.safeParse({
    from: typeof raw.from === "string" ? raw.from : undefined,
    to: typeof raw.to === "string" ? raw.to : undefined,
  });
  const asked = query.success ? replayWindow(query.data, now) : { error: "The window could not be read." };
  const window = "error" in asked ? (replayWindow({}, now) as { fromMs: number; toMs: number }) : asked;
  return { asked, window };
}

export default async function ReplayPage({ params, searchParams }: Props) {
  const viewer = await requirePageViewer();
  const site = getSite(getDb(), viewer, (await params).siteId);
  if (!site) notFound();
  const { asked, window } = windowOf(await searchParams);
  return (
    <article>
      <header className="mb-4">
        <h1 className="text-2xl font-semibold">Replay: {site.name}</h1>
        <p className="text-sm">
          <Link href={`/sites/${site.id}`} className="underline">
            Back to the live site
          </Link>
        </p>
        {"error" in asked ? (
          <p role="alert" className="mt-2 text-alarm">
            {asked.error} Showing the last hour instead.
          </p>
        ) : null}
      </header>
      <ReplayPlayer
        key={`${window.fromMs}-${window.toMs}`}
        siteId={site.id}
        fromMs={window.fromMs}
        toMs={window.toMs}
        unitSystem={viewer.unitSystem}
        timeZone={site.timeZone}
      />
    </article>
  );
}
