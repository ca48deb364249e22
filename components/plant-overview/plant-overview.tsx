import type { OverviewModel, OverviewPipe, Rect, StateSlot, TextSlot } from "@/lib/plant/overview-layout";
import {
  equipmentState,
  formatCountdown,
  marginGauge,
  runStateWord,
  type CrossoverOutlook,
  type RunState,
} from "@/lib/plant/overview-values";
import type { SiteDataState } from "@/lib/freshness";
import { formatDuration, formatValue, type UnitSystem } from "@/lib/units";
import { formatDelta } from "@/lib/client/format";

/** One point's value as the drawing shows it: canonical SI, with its event time and freshness. */
export interface OverviewPointValue {
  value: number | boolean | string | null;
  tsMs: number | null;
  stale: boolean;
}

/** A chiller's derived numbers beside its shells. */
export interface OverviewChillerValues {
  marginK: number | null;
  /** The smallest margin it can start with (K); null when its record gives none. */
  minMarginK: number | null;
  /** Restart lockout left now (s); null when unknown. */
  lockoutLeftS: number | null;
  crossover: CrossoverOutlook;
}

export interface PlantOverviewProps {
  model: OverviewModel;
  values: Readonly<Record<number, OverviewPointValue | undefined>>;
  chillers: Readonly<Record<string, OverviewChillerValues | undefined>>;
  /** Equipment tags with a temporary change in place. */
  changedTags: readonly string[];
  unitSystem: UnitSystem;
  /** Each value links to its trend: `${trendHref}${pointId}`. */
  trendHref: string;
  dataState: SiteDataState | null;
  label: string;
}

// Glyphs carry the state besides the word (ISA-101: never colour alone); fault alone is coloured.
const glyph: Record<RunState, string> = { run: "▶", off: "□", fault: "◆", hand: "◐", unknown: "○" };
const stateClass: Record<RunState, string> = {
  run: "fill-current",
  off: "fill-current",
  fault: "fill-alarm font-bold",
  hand: "fill-warning font-bold",
  unknown: "fill-muted",
};

const bool = (v: OverviewPointValue | undefined): boolean | null =>
  v && !v.stale && typeof v.value === "boolean" ? v.value : null;
const str = (v: OverviewPointValue | undefined): string | null =>
  v && !v.stale && typeof v.value === "string" ? v.value : null;
const num = (v: OverviewPointValue | undefined): number | null =>
  v && typeof v.value === "number" && Number.isFinite(v.value) ? v.value : null;

function Text({ slot, className, children }: { slot: TextSlot; className?: string; children: React.ReactNode }) {
  return (
    <text x={slot.x} y={slot.y} textAnchor={slot.anchor} className={className ?? "fill-current"}>
      {children}
    </text>
  );
}

function StateText({ slot, values }: { slot: StateSlot; values: PlantOverviewProps["values"] }) {
  const r = slot.refs;
  const v = (id: number | undefined) => (id === undefined ? undefined : values[id]);
  const state = equipmentState(slot.kind, {
    run: bool(v(r.run)),
    faults: r.faults.map((id) => bool(v(id))),
    command: bool(v(r.command)),
    mode: str(v(r.mode)),
  });
  let word: string = runStateWord[state];
  if (slot.kind === "pump" && state === "unknown") word = "?";
  if (slot.kind === "tower_fan") {
    const speed = num(v(r.speed));
    const mode = str(v(r.mode));
    word =
      state === "run" && speed !== null
        ? `FAN ${speed.toFixed(0)} %`
        : state === "off" && mode === "auto"
          ? "FAN OFF (auto)"
          : `FAN ${word}`;
  }
  return (
    <text
      x={slot.x}
      y={slot.y}
      textAnchor={slot.anchor}
      className={stateClass[state]}
      data-testid="overview-state"
      data-tag={slot.tag}
      data-state={state}
    >
      {glyph[state]} {word}
    </text>
  );
}

function Pipe({ pipe }: { pipe: OverviewPipe }) {
  const points = pipe.points.map(([x, y]) => `${x},${y}`).join(" ");
  return (
    <g data-loop={pipe.loop}>
      {/* A panel-coloured underlay breaks the line beneath where pipes cross. */}
      <polyline points={points} fill="none" stroke="var(--color-panel)" strokeWidth={6} />
      <polyline
        points={points}
        fill="none"
        className="stroke-current"
        strokeWidth={pipe.loop === "condenser_water" ? 2.5 : 2}
        strokeDasharray={pipe.role === "return" ? "6 3" : undefined}
      />
    </g>
  );
}

function Frame({ rect, changed, kind }: { rect: Rect; changed: boolean; kind: string }) {
  return (
    <>
      <rect
        x={rect.x}
        y={rect.y}
        width={rect.w}
        height={rect.h}
        rx={kind === "pump" ? 14 : 4}
        fill="var(--color-panel)"
        className={kind === "load" || kind === "tower" ? "stroke-muted" : "stroke-current"}
        strokeWidth={kind === "condenser" || kind === "evaporator" ? 1.5 : 1}
      />
      {changed ? <ChangeOutline rect={rect} /> : null}
    </>
  );
}

/** A temporary change in place: a dashed outline around the equipment (and "⚑ CHANGE" where there is room). */
function ChangeOutline({ rect }: { rect: Rect }) {
  return (
    <rect
      x={rect.x - 3}
      y={rect.y - 3}
      width={rect.w + 6}
      height={rect.h + 6}
      rx={6}
      fill="none"
      className="stroke-warning"
      strokeWidth={2}
      strokeDasharray="4 3"
      data-testid="overview-change-outline"
    />
  );
}

function MarginBar({ rect, gauge }: { rect: Rect; gauge: ReturnType<typeof marginGauge> }) {
  const low = gauge.status === "crossed" || gauge.status === "below_minimum";
  const minX = rect.x + rect.w * gauge.minFraction;
  return (
    <g aria-hidden="true">
      <rect x={rect.x} y={rect.y} width={rect.w} height={rect.h} fill="none" className="stroke-muted" />
      {gauge.status !== "unknown" ? (
        <rect
          x={rect.x}
          y={rect.y}
          width={Math.max(1, rect.w * gauge.fraction)}
          height={rect.h}
          className={low ? "fill-alarm" : "fill-muted"}
        />
      ) : null}
      {/* The minimum as a tall tick, so the bar reads against it without colour. */}
      <line x1={minX} x2={minX} y1={rect.y - 3} y2={rect.y + rect.h + 3} className="stroke-current" strokeWidth={2} />
    </g>
  );
}

function crossoverWords(c: CrossoverOutlook): string {
  switch (c.status) {
    case "closing":
      return `Crossover in about ${formatDuration(c.seconds)}`;
    case "crossed":
      return "LOOPS CROSSED";
    case "not_closing":
      return "Loops not closing";
    default:
      return "Crossover: no projection yet";
  }
}

/**
 * The plant drawn from its model, filled with the values given: live (see LivePlantOverview) or
 * stored ones replayed. Every value links to its trend.
 */
export function PlantOverview({
  model,
  values,
  chillers,
  changedTags,
  unitSystem,
  trendHref,
  dataState,
  label,
}: PlantOverviewProps) {
  const changed = new Set(changedTags);
  const offline = dataState === "offline" || dataState === "no_gateway";
  const titleId = `overview-${model.variant}-title`;
  const ahus = model.load.airHandlers;
  const running = ahus.filter((a) => a.run !== undefined && bool(values[a.run]) === true).length;
  const valves = ahus.flatMap((a) => (a.valve === undefined ? [] : (num(values[a.valve]) ?? [])));
  const valveAvg = valves.length ? valves.reduce((s, x) => s + x, 0) / valves.length : null;
  return (
    <svg
      viewBox={`0 0 ${model.width} ${model.height}`}
      width="100%"
      style={{ maxWidth: model.width * 1.15 }}
      className="mx-auto block text-ink"
      fontSize={model.fontPx}
      role="group"
      aria-labelledby={titleId}
      data-testid="plant-overview-svg"
      data-variant={model.variant}
    >
      <title id={titleId}>{label}</title>
      {model.pipes.map((p) => (
        <Pipe key={p.id} pipe={p} />
      ))}
      {model.boxes.map((b) => (
        <Frame
          key={b.id}
          rect={b.rect}
          kind={b.kind}
          changed={b.kind !== "evaporator" && b.kind !== "condenser" && changed.has(b.tag)}
        />
      ))}
      {model.boxes
        .filter((b) => b.kind === "condenser" && changed.has(b.tag))
        .map((b) => {
          const evap = model.boxes.find((e) => e.kind === "evaporator" && e.tag === b.tag)?.rect ?? b.rect;
          return <ChangeOutline key={`${b.id}:change`} rect={{ ...b.rect, h: evap.y + evap.h - b.rect.y }} />;
        })}
      {model.titles.map((t) => (
        <Text key={t.id} slot={t} className="fill-current font-semibold">
          {t.text}
        </Text>
      ))}
      {model.states.map((s) => (
        <StateText key={s.id} slot={s} values={values} />
      ))}
      {model.values.map((v) => {
        const point = values[v.pointId];
        const stale = offline || !point || point.stale || point.tsMs === null;
        const shown = point && point.tsMs !== null ? formatValue(point.value, v.measure, unitSystem) : "no data";
        const r = v.rect;
        return (
          <a key={v.id} href={`${trendHref}${v.pointId}`} data-testid="overview-value" data-stale={stale}>
            <rect x={r.x} y={r.y - 2} width={r.w} height={r.h + 4} fill="transparent" />
            <text x={v.x} y={v.y} textAnchor={v.anchor} className={stale ? "fill-muted" : "fill-current"}>
              <tspan className="fill-muted">{v.label} </tspan>
              <tspan className={stale ? "" : "font-semibold"} data-testid="overview-value-text">
                {shown}
              </tspan>
              <title>{`${v.tag} ${v.label}: ${shown}${stale ? " (stale)" : ""}, open trend`}</title>
            </text>
            {stale ? (
              // Stale values are underlined dashed: a shape, not only a lighter colour.
              <line
                x1={r.x}
                x2={r.x + r.w * 0.8}
                y1={v.y + 3}
                y2={v.y + 3}
                className="stroke-muted"
                strokeDasharray="2 2"
              />
            ) : null}
          </a>
        );
      })}
      {model.chillers.map((c) => {
        const d = chillers[c.tag];
        const gauge = marginGauge(d?.marginK ?? null, d?.minMarginK ?? null);
        const low = gauge.status === "crossed" || gauge.status === "below_minimum";
        const marginWords =
          gauge.status === "unknown"
            ? "Crossover margin —"
            : gauge.status === "crossed"
              ? `Margin ${formatDelta(d!.marginK, unitSystem)}: CROSSED`
              : gauge.status === "below_minimum"
                ? `Margin ${formatDelta(d!.marginK, unitSystem)}: BELOW MIN`
                : `Crossover margin ${formatDelta(d!.marginK, unitSystem)}`;
        const lockout = d?.lockoutLeftS ?? null;
        return (
          <g key={c.tag} data-testid="overview-chiller" data-tag={c.tag}>
            <Text slot={c.marginText} className={low ? "fill-alarm font-bold" : "fill-current"}>
              <tspan data-testid="overview-margin">{marginWords}</tspan>
            </Text>
            <MarginBar rect={c.marginBar} gauge={gauge} />
            <Text slot={c.minText} className="fill-muted">
              {`min ${formatDelta(d?.minMarginK ?? 0, unitSystem)}`}
            </Text>
            <Text slot={c.lockoutText} className={lockout ? "fill-current font-semibold" : "fill-muted"}>
              <tspan data-testid="overview-lockout">
                {lockout === null
                  ? "Restart lockout: unknown"
                  : lockout > 0
                    ? `Restart lockout ${formatCountdown(lockout)} left`
                    : "No restart lockout"}
              </tspan>
            </Text>
            <Text
              slot={c.crossoverText}
              className={
                d?.crossover.status === "closing" || d?.crossover.status === "crossed"
                  ? "fill-alarm font-bold"
                  : "fill-muted"
              }
            >
              <tspan data-testid="overview-crossover">{crossoverWords(d?.crossover ?? { status: "unknown" })}</tspan>
            </Text>
            {changed.has(c.tag) ? (
              <Text slot={c.changeText} className="fill-warning font-bold">
                ⚑ CHANGE
              </Text>
            ) : null}
          </g>
        );
      })}
      {model.towerChanges
        .filter((t) => changed.has(t.tag))
        .map((t) => (
          <Text key={t.tag} slot={t.slot} className="fill-warning font-bold">
            ⚑ CHANGE
          </Text>
        ))}
      <Text slot={model.load.title} className="fill-current font-semibold">
        {ahus.length ? `Load: ${ahus.length} air handler${ahus.length === 1 ? "" : "s"}` : "Load"}
      </Text>
      <Text slot={model.load.detail} className="fill-muted">
        {ahus.length
          ? `${running} running${valveAvg === null ? "" : ` · CHW valves avg ${valveAvg.toFixed(0)} %`}`
          : "no air handlers recorded"}
      </Text>
    </svg>
  );
}
