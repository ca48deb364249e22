"use client";

import { fromSiteWallInput, toSiteWallInput } from "@/lib/client/site-wall-time";
import { useEffect, useMemo, useState } from "react";
import { useRouter } from "next/navigation";
import useSWR from "swr";
import { fetchJson } from "@/lib/client/fetcher";
import { formatClock, formatDateTime } from "@/lib/client/format";
import type { ReplayWindowDto } from "@/lib/dto/replay";
import { nextTransitionAfter, standingAlarms } from "@/lib/alarms/standing";
import type { Reading } from "@/lib/plant/site";
import { defaultRuleSettings, marginSeries, ReadingHistory, snapshotFromHistory, type RuleContext } from "@/lib/rules";
import type { UnitSystem } from "@/lib/units";
import { PriorityBadge, stateLabel } from "@/components/alarms/priority";
import { DerivedPanel } from "@/components/sites/derived-panel";

const SPEEDS = [1, 10, 60, 600] as const;
/** How often the replay clock moves while playing (wall ms). */
const FRAME_MS = 250;
/** One step: the simulated gateways' and most controllers' sample interval. */
const STEP_MS = 10_000;
const TREND_WINDOW_S = 3600;

const ruleWords = (ruleId: string) => ruleId.replaceAll("_", " ");

function buildHistory(data: ReplayWindowDto): ReadingHistory {
  const readings: Reading[] = [];
  for (const p of data.points)
    for (let i = 0; i < p.tsMs.length; i++)
      readings.push({ tsMs: p.tsMs[i], equipment: p.equipment, quantity: p.quantity, value: p.values[i] });
  readings.sort((a, b) => a.tsMs - b.tsMs);
  // Keep the whole window (the live monitor keeps only its look-back): the clock moves both ways.
  const history = new ReadingHistory((data.toMs - data.fromMs) / 1000 + 2 * 3600);
  history.addAll(readings);
  return history;
}

/** Plays a stored window of a site back (keyed by the window: a new one starts at its beginning): plant numbers and alarms as they were at the replay clock. */
export function ReplayPlayer({
  siteId,
  fromMs,
  toMs,
  unitSystem,
  timeZone,
}: {
  siteId: string;
  fromMs: number;
  toMs: number;
  unitSystem: UnitSystem;
  timeZone: string;
}) {
  const router = useRouter();
  const url = `/api/sites/${encodeURIComponent(siteId)}/replay?from=${fromMs}&to=${toMs}`;
  const { data, error, isLoading } = useSWR<{ replay: ReplayWindowDto }>(url, fetchJson, {
    revalidateOnFocus: false,
  });
  const replay = data?.replay;
  const history = useMemo(() => (replay ? buildHistory(replay) : null), [replay]);
  const [atMs, setAtMs] = useState(fromMs);
  const [playing, setPlaying] = useState(false);
  const [speed, setSpeed] = useState<(typeof SPEEDS)[number]>(60);
  const [pickFrom, setPickFrom] = useState(() => toSiteWallInput(fromMs, timeZone));
  const [pickHours, setPickHours] = useState(() => String(Math.max(1, Math.round((toMs - fromMs) / 3_600_000))));
  // Playing stops by itself at the window's end.
  const running = playing && atMs < toMs;

  useEffect(() => {
    if (!running) return;
    const timer = setInterval(() => setAtMs((t) => Math.min(toMs, t + FRAME_MS * speed)), FRAME_MS);
    return () => clearInterval(timer);
  }, [running, speed, toMs]);

  // Numbers are drawn at whole seconds: the clock moves by fractions of one at 1×.
  const atS = Math.floor(atMs / 1000) * 1000;
  const derived = useMemo(() => {
    if (!replay || !history) return null;
    const settings = { ...defaultRuleSettings, crossoverRisk: replay.crossoverRisk };
    const snapshot = snapshotFromHistory(replay.equipment, history, settings, atS);
    const probe = { site: replay.equipment, history, nowMs: atS } as Pick<
      RuleContext,
      "site" | "history" | "nowMs"
    > as RuleContext;
    const marginTrend: Record<string, { tsMs: number[]; marginK: number[] }> = {};
    for (const chiller of replay.equipment.filter((e) => e.kind === "chiller")) {
      const series = marginSeries(probe, chiller, TREND_WINDOW_S);
      const step = Math.max(1, Math.ceil(series.length / 180));
      const kept = series.filter((_, i) => i % step === 0 || i === series.length - 1);
      marginTrend[chiller.tag] = { tsMs: kept.map((p) => p.tsMs), marginK: kept.map((p) => p.value) };
    }
    return { snapshot, marginTrend };
  }, [replay, history, atS]);
  const alarms = useMemo(
    () => (replay ? standingAlarms(replay.activeAtStart, replay.transitions, atMs) : []),
    [replay, atMs],
  );
  const nextEventMs = replay ? nextTransitionAfter(replay.transitions, atMs) : null;

  const pickWindow = (e: React.FormEvent) => {
    e.preventDefault();
    const from = fromSiteWallInput(pickFrom, timeZone);
    if (!Number.isFinite(from)) return;
    const to = from + Number(pickHours) * 3_600_000;
    router.push(`/sites/${encodeURIComponent(siteId)}/replay?from=${from}&to=${to}`);
  };
  const button =
    "min-h-11 rounded border border-line bg-panel px-3 py-2 text-sm font-semibold text-ink disabled:opacity-50 focus-visible:outline-2";

  return (
    <div className="flex flex-col gap-4">
      <section
        aria-label="Replay clock"
        className="sticky top-0 z-10 rounded-lg border-2 border-dashed border-ink bg-panel p-3"
        data-testid="replay-banner"
      >
        <p className="text-sm font-bold uppercase tracking-wide">Replay — not live</p>
        <p className="text-2xl font-semibold tabular-nums" data-testid="replay-clock" data-at-ms={atMs}>
          {new Date(atMs).toLocaleDateString("en-US", { month: "short", day: "numeric", timeZone })}{" "}
          {formatClock(atMs, timeZone)}
        </p>
        <p className="text-xs text-muted">
          Site time ({timeZone}) · {running ? `playing at ${speed}×` : "paused"} · window{" "}
          {formatDateTime(fromMs, timeZone)} – {formatDateTime(toMs, timeZone)}
        </p>
        <div className="mt-2 flex flex-wrap items-center gap-2">
          <button
            type="button"
            className={button}
            onClick={() => setPlaying(!running)}
            disabled={!replay || atMs >= toMs}
            data-testid="replay-play"
          >
            {running ? "Pause" : "Play"}
          </button>
          <button
            type="button"
            className={button}
            onClick={() => {
              setPlaying(false);
              setAtMs((t) => Math.min(toMs, t + STEP_MS));
            }}
            disabled={!replay || atMs >= toMs}
          >
            Step 10 s
          </button>
          <button
            type="button"
            className={button}
            onClick={() => {
              setPlaying(false);
              if (nextEventMs !== null) setAtMs(nextEventMs);
            }}
            disabled={nextEventMs === null}
            data-testid="replay-next-event"
          >
            Next event
          </button>
          <div role="group" aria-label="Speed" className="flex gap-1">
            {SPEEDS.map((s) => (
              <button
                key={s}
                type="button"
                aria-pressed={speed === s}
                className={`${button} ${speed === s ? "border-ink underline" : ""}`}
                onClick={() => setSpeed(s)}
                data-testid={`replay-speed-${s}`}
              >
                {s}×
              </button>
            ))}
          </div>
        </div>
        <label className="mt-2 block text-xs text-muted">
          Position in the window
          <input
            type="range"
            className="block w-full"
            min={fromMs}
            max={toMs}
            step={STEP_MS}
            value={atMs}
            aria-valuetext={formatClock(atMs, timeZone)}
            onChange={(e) => {
              setPlaying(false);
              setAtMs(Number(e.target.value));
            }}
          />
        </label>
      </section>

      {error ? (
        <p role="alert" className="text-alarm">
          Could not load this window: {error instanceof Error ? error.message : String(error)}
        </p>
      ) : null}
      {isLoading ? <p className="text-muted">Loading the stored readings…</p> : null}

      <section aria-labelledby="replay-alarms-title">
        <h2 id="replay-alarms-title" className="mb-2 text-lg font-semibold">
          Alarms at {formatClock(atMs, timeZone)}
        </h2>
        {alarms.length === 0 ? (
          <p className="text-muted" data-testid="replay-no-alarms">
            No alarm out of normal at this moment.
          </p>
        ) : (
          <ul className="flex flex-col gap-2">
            {alarms.map((a) => (
              <li
                key={a.alarmKey}
                className="flex flex-wrap items-center gap-2 rounded border border-line bg-panel p-2 text-sm"
                data-testid="replay-alarm"
                data-key={a.alarmKey}
                data-rule={a.ruleId}
                data-state={a.state}
              >
                <PriorityBadge priority={a.priority} />
                <span className="font-semibold">
                  {a.equipment === "site" ? "Site" : a.equipment}: {ruleWords(a.ruleId)}
                </span>
                <span className="text-muted">
                  {stateLabel[a.state] ?? a.state} since {formatClock(a.sinceMs, timeZone)}
                </span>
              </li>
            ))}
          </ul>
        )}
      </section>

      <section aria-labelledby="replay-numbers-title">
        <h2 id="replay-numbers-title" className="mb-2 text-lg font-semibold">
          Plant numbers at {formatClock(atS, timeZone)}
        </h2>
        {derived ? (
          <DerivedPanel
            snapshot={derived.snapshot}
            marginTrend={derived.marginTrend}
            marginTrendWindowS={TREND_WINDOW_S}
            unitSystem={unitSystem}
            timeZone={timeZone}
          />
        ) : null}
      </section>

      {replay ? (
        <details className="rounded border border-line bg-panel p-3">
          <summary className="cursor-pointer font-semibold">
            Alarm events in the window ({replay.transitions.length})
          </summary>
          <ol className="mt-2 flex flex-col gap-1 text-sm">
            {replay.transitions.map((t, i) => (
              <li key={i}>
                <button
                  type="button"
                  className="text-left underline"
                  onClick={() => {
                    setPlaying(false);
                    setAtMs(t.atMs);
                  }}
                >
                  {formatClock(t.atMs, timeZone)} {t.equipment}: {ruleWords(t.ruleId)} — {stateLabel[t.from] ?? t.from}{" "}
                  → {stateLabel[t.to] ?? t.to}
                </button>
              </li>
            ))}
          </ol>
        </details>
      ) : null}

      <form onSubmit={pickWindow} className="flex flex-wrap items-end gap-3 rounded border border-line bg-panel p-3">
        <label className="flex flex-col text-sm">
          From (site time)
          <input
            type="datetime-local"
            className="rounded border border-line bg-panel p-2"
            value={pickFrom}
            onChange={(e) => setPickFrom(e.target.value)}
            required
          />
        </label>
        <label className="flex flex-col text-sm">
          Length
          <select
            className="rounded border border-line bg-panel p-2"
            value={pickHours}
            onChange={(e) => setPickHours(e.target.value)}
          >
            {[1, 2, 4, 8, 12, 24].map((h) => (
              <option key={h} value={h}>
                {h} h
              </option>
            ))}
          </select>
        </label>
        <button type="submit" className={button}>
          Replay this window
        </button>
      </form>
    </div>
  );
}
