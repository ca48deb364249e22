import type { DrillAlarmEventDto, DrillWithStepsDto } from "@/lib/dto/drills";
import type { ScorePart } from "@/lib/drills/score";
import { Sparkline } from "@/components/charts/sparkline";
import { renderQuantities } from "@/lib/quantity-text";
import type { UnitSystem } from "@/lib/units";

export interface DebriefTrend {
  label: string;
  xs: number[];
  ys: number[];
  zeroLine?: boolean;
}

const outcomeText = {
  avoided: "Crossover avoided",
  crossed: "Loops crossed",
  timed_out: "Ran out of time with a chiller still down",
  stopped: "Stopped early",
} as const;

const endText = {
  recovery: "the plant recovered (chiller back on load)",
  failed_restart: "a restart after the crossing failed",
  time: "the scenario's time ran out",
  stopped: "it was stopped",
} as const;

type TimelineItem = { atMs: number; kind: string; text: string; who?: string | null };

/** A drill's debrief: outcome and score parts, trends, one timeline, and each step beside the advice of its moment. */
export function DrillDebrief({
  drill,
  alarmEvents,
  trends,
  unitSystem,
}: {
  drill: DrillWithStepsDto;
  alarmEvents: DrillAlarmEventDto[];
  trends: DebriefTrend[];
  /** The reader's units: alarm words carry their numbers as quantity tokens. */
  unitSystem: UnitSystem;
}) {
  const words = (text: string) => renderQuantities(text, unitSystem);
  const tz = drill.siteTimeZone;
  const time = (ms: number) =>
    new Date(ms).toLocaleTimeString("en-US", { timeZone: tz, hour: "2-digit", minute: "2-digit", second: "2-digit" });
  const sinceStart = (ms: number) => `+${Math.round((ms - drill.startedAtMs) / 60_000)} min`;
  const score = drill.score as
    | (DrillWithStepsDto["score"] & {
        events?: Array<{ tsMs: number; kind: string; equipment: string | null; message: string }>;
      })
    | null;
  const timeline: TimelineItem[] = [
    ...alarmEvents.map((e) => ({
      atMs: e.atMs,
      kind: "Alarm",
      text: `${e.equipment}: ${words(e.title)} — ${e.cause.replace(/_/g, " ")} (${e.from.replace(/_/g, " ")} → ${e.to.replace(/_/g, " ")})`,
      who: e.actorName,
    })),
    ...drill.steps.map((s) => ({
      atMs: s.atMs,
      kind: s.kind === "command" ? "Trainee" : s.kind,
      text: s.detail.text,
      who: s.userName,
    })),
    ...(score?.events ?? [])
      .filter((e) => e.kind !== "fault")
      .map((e) => ({ atMs: e.tsMs, kind: "Plant", text: `${e.equipment ?? ""} ${e.message}`.trim() })),
  ].sort((a, b) => a.atMs - b.atMs);
  const commands = drill.steps.filter((s) => s.kind === "command");

  return (
    <div className="flex flex-col gap-6">
      <section aria-labelledby="outcome-title" className="rounded border border-line bg-panel p-3">
        <h2 id="outcome-title" className="text-lg font-semibold">
          {drill.state === "running" ? "Running" : outcomeText[drill.outcome ?? "stopped"]}
          {drill.scorePct !== null ? ` — score ${drill.scorePct} %` : ""}
        </h2>
        {score ? <p className="text-sm text-muted">The drill ended because {endText[score.endReason]}.</p> : null}
        {score ? (
          <table className="mt-2 w-full text-left text-sm">
            <thead>
              <tr className="border-b border-line">
                <th className="py-1 pr-2">Part</th>
                <th className="py-1 pr-2">Points</th>
                <th className="py-1">What was measured</th>
              </tr>
            </thead>
            <tbody>
              {score.parts.map((p: ScorePart) => (
                <tr key={p.key} className="border-b border-line align-top">
                  <td className="py-1 pr-2 font-semibold">
                    {p.points === p.max ? "✓ " : "✗ "}
                    {p.label}
                  </td>
                  <td className={`py-1 pr-2 ${p.points === p.max ? "" : "text-alarm"}`}>
                    {p.points} / {p.max}
                  </td>
                  <td className="py-1">{p.detail}</td>
                </tr>
              ))}
            </tbody>
          </table>
        ) : null}
      </section>

      <section aria-labelledby="trends-title">
        <h2 id="trends-title" className="mb-2 text-lg font-semibold">
          Trends
        </h2>
        <div className="grid grid-cols-1 gap-3 md:grid-cols-2">
          {trends.map((t) => (
            <figure key={t.label} className="rounded border border-line bg-panel p-2">
              <figcaption className="text-sm font-semibold">{t.label}</figcaption>
              {t.xs.length ? (
                <Sparkline
                  xs={t.xs}
                  ys={t.ys}
                  label={t.label}
                  zeroLine={t.zeroLine}
                  timeZone={tz}
                  xRangeMs={[drill.startedAtMs, drill.endedAtMs ?? t.xs[t.xs.length - 1]]}
                />
              ) : (
                <p className="text-sm text-muted">No stored readings.</p>
              )}
            </figure>
          ))}
        </div>
      </section>

      <section aria-labelledby="steps-title">
        <h2 id="steps-title" className="mb-2 text-lg font-semibold">
          The trainee&apos;s steps beside the advice of the moment
        </h2>
        {commands.length === 0 ? <p className="text-sm text-muted">The trainee sent no commands.</p> : null}
        <ol className="flex flex-col gap-2">
          {commands.map((s) => (
            <li
              key={s.id}
              className="grid grid-cols-1 gap-2 rounded border border-line bg-panel p-2 text-sm md:grid-cols-2"
            >
              <div>
                <p className="font-semibold">
                  {time(s.atMs)} ({sinceStart(s.atMs)}) — {s.detail.text}
                </p>
                <p className="text-muted">{s.userName ?? "—"}</p>
              </div>
              <div>
                <p className="font-semibold">The rules advised then:</p>
                {s.advice && s.advice.length > 0 ? (
                  <ul className="list-disc pl-5">
                    {s.advice.flatMap((a) =>
                      a.advice.map((line) => (
                        <li key={`${a.equipment}-${line}`}>
                          {a.equipment}: {words(line)}
                        </li>
                      )),
                    )}
                  </ul>
                ) : (
                  <p className="text-muted">No active alarm with advice.</p>
                )}
              </div>
            </li>
          ))}
        </ol>
      </section>

      <section aria-labelledby="timeline-title">
        <h2 id="timeline-title" className="mb-2 text-lg font-semibold">
          Timeline (plant time, {tz})
        </h2>
        <ol className="flex flex-col text-sm">
          {timeline.map((t, i) => (
            <li
              key={`${t.atMs}-${i}`}
              className="grid grid-cols-[4.5rem_3.5rem_minmax(0,1fr)] gap-2 break-words border-b border-line py-1 sm:grid-cols-[6.5rem_5rem_minmax(0,1fr)]"
            >
              <span className="tabular-nums">{time(t.atMs)}</span>
              <span className="font-semibold">{t.kind}</span>
              <span>
                {t.text}
                {t.who ? <span className="text-muted"> — {t.who}</span> : null}
              </span>
            </li>
          ))}
        </ol>
      </section>
    </div>
  );
}
