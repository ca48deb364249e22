import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { getEquipmentHistory } from "@/db/queries/equipment-history";
import { siteTimeZone } from "@/db/queries/sites";
import { historyKindLabels, historyKinds, mergeHistory, type HistoryKind } from "@/lib/equipment-history";
import { systemClock } from "@/lib/clock";
import { equipmentHistoryQuerySchema } from "@/lib/schemas/equipment-history";
import { pathParam } from "@/lib/server/http";
import { getDb, getRuntime } from "@/lib/server/runtime";
import { requirePageViewer } from "../../../../../(auth)/auth";

export const metadata: Metadata = { title: "Equipment history" };
export const dynamic = "force-dynamic";

type Props = {
  params: Promise<{ siteId: string; equipmentId: string }>;
  searchParams: Promise<Record<string, string | string[] | undefined>>;
};

const periods = [1, 7, 30, 90] as const;

export default async function EquipmentHistoryPage({ params, searchParams }: Props) {
  const viewer = await requirePageViewer();
  const { siteId, equipmentId } = await params;
  const parsed = equipmentHistoryQuerySchema.safeParse(await searchParams);
  const query = parsed.success ? parsed.data : { days: 7, kind: [] as HistoryKind[] };
  const nowMs = systemClock.now();
  const db = getDb();
  const history = getEquipmentHistory(db, viewer, pathParam(equipmentId), {
    fromMs: nowMs - query.days * 86_400_000,
    toMs: nowMs,
    nowMs,
    inMemory: getRuntime()?.latestValue,
  });
  // Another site's equipment under this site's address looks like equipment that does not exist.
  if (!history || history.equipment.siteId !== pathParam(siteId)) notFound();
  const { equipment: eq, run } = history;
  const timeZone = siteTimeZone(db, eq.siteId) ?? "UTC";
  const fmt = new Intl.DateTimeFormat("en-US", { timeZone, dateStyle: "medium", timeStyle: "short" });
  const events = mergeHistory(history.events, query.kind);
  const siteHref = `/sites/${encodeURIComponent(eq.siteId)}`;
  const href = (days: number, kinds: readonly HistoryKind[]) => {
    const q = new URLSearchParams({ days: String(days) });
    for (const k of kinds) q.append("kind", k);
    return `?${q.toString()}`;
  };
  const toggle = (k: HistoryKind) => (query.kind.includes(k) ? query.kind.filter((x) => x !== k) : [...query.kind, k]);

  return (
    <section className="flex flex-col gap-4">
      <p className="text-sm">
        <Link href={siteHref} className="underline">
          Back to the site
        </Link>
      </p>
      <h1 className="text-2xl font-semibold">
        {eq.tag} {eq.name} · history
      </h1>
      <p className="text-sm text-muted">
        Times in the site&apos;s time zone ({timeZone}).
        {eq.kind === "chiller" ? (
          <>
            {" "}
            <Link href={`${siteHref}/equipment/${encodeURIComponent(eq.id)}/refrigerant`} className="underline">
              Refrigerant log
            </Link>
          </>
        ) : null}
      </p>

      <nav aria-label="Period" className="flex flex-wrap gap-2 text-sm">
        {periods.map((d) => (
          <Link
            key={d}
            href={href(d, query.kind)}
            aria-current={d === query.days ? "page" : undefined}
            className={`rounded border border-line px-3 py-1.5 ${d === query.days ? "bg-ink text-panel" : "bg-panel"}`}
          >
            {d === 1 ? "Last day" : `Last ${d} days`}
          </Link>
        ))}
      </nav>

      {run ? (
        <dl className="grid grid-cols-2 gap-3 rounded border border-line bg-panel p-3 text-sm sm:w-max">
          <div>
            <dt className="text-muted">Run hours in the period</dt>
            <dd className="text-lg font-semibold tabular-nums">{run.runHours.toFixed(1)} h</dd>
          </div>
          <div>
            <dt className="text-muted">Starts in the period</dt>
            <dd className="text-lg font-semibold tabular-nums">{run.starts}</dd>
          </div>
        </dl>
      ) : null}

      <nav aria-label="Show" className="flex flex-wrap gap-2 text-sm">
        {historyKinds.map((k) => {
          const on = query.kind.includes(k);
          return (
            <Link
              key={k}
              href={href(query.days, toggle(k))}
              aria-current={on ? "true" : undefined}
              className={`rounded-full border px-3 py-1.5 ${on ? "border-ink bg-ink text-panel" : "border-line bg-panel"}`}
            >
              {on ? "✓ " : ""}
              {historyKindLabels[k]}
            </Link>
          );
        })}
        {query.kind.length ? (
          <Link href={href(query.days, [])} className="px-2 py-1.5 underline">
            Show all
          </Link>
        ) : null}
      </nav>

      {events.length === 0 ? (
        <p className="text-muted">Nothing recorded in this period.</p>
      ) : (
        <ol className="flex flex-col divide-y divide-line rounded border border-line bg-panel">
          {events.map((e, i) => (
            <li key={`${e.atMs}-${i}`} className="flex flex-col gap-0.5 px-3 py-2 sm:flex-row sm:gap-4">
              <time
                dateTime={new Date(e.atMs).toISOString()}
                className="shrink-0 text-sm text-muted tabular-nums sm:w-44"
              >
                {fmt.format(e.atMs)}
              </time>
              <span className="shrink-0 text-xs uppercase tracking-wide text-muted sm:w-28 sm:pt-0.5">
                {historyKindLabels[e.kind]}
              </span>
              <span className="min-w-0">
                {e.href ? (
                  <Link href={e.href} className="underline">
                    {e.title}
                  </Link>
                ) : (
                  e.title
                )}
                {e.detail ? <span className="block text-sm text-muted">{e.detail}</span> : null}
              </span>
            </li>
          ))}
        </ol>
      )}
    </section>
  );
}
