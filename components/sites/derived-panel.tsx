import type { ChillerSnapshot, SiteSnapshot } from "@/lib/plant/snapshot";
import { formatClock, formatDelta, formatPressureDelta } from "@/lib/client/format";
import { formatDuration, type UnitSystem } from "@/lib/units";
import { tonsToKw } from "@/lib/plant/units";
import { Sparkline } from "@/components/charts/sparkline";

function crossoverText(c: ChillerSnapshot): string {
  // The short fit follows a trip; the long one sees a slow drift. Show the sooner of the two.
  const fits = [c.timeToCrossover, c.slowTimeToCrossover].filter((f) => f !== null);
  if (fits.some((f) => f.status === "crossed")) return "crossed";
  const closing = fits.flatMap((f) => (f.status === "closing" ? [f] : []));
  if (closing.length) {
    const soonest = closing.reduce((a, b) => (a.timeToCrossoverS < b.timeToCrossoverS ? a : b));
    return `${formatDuration(soonest.timeToCrossoverS)} (closing)`;
  }
  if (fits.some((f) => f.status === "not_closing")) return "not closing";
  return "not enough data yet";
}

/** A chiller's state in words that change only when something meaningful does (for screen readers). */
function chillerSummary(c: ChillerSnapshot): string {
  const state = c.running === null ? "state unknown" : c.running ? "running" : "off";
  const locked = c.lockout.source !== "unknown" && (c.lockout.lockoutLeftS ?? 0) > 0 ? ", restart locked out" : "";
  const fits = [c.timeToCrossover, c.slowTimeToCrossover].filter((f) => f !== null);
  const loops = fits.some((f) => f.status === "crossed")
    ? ", loops crossed"
    : fits.some((f) => f.status === "closing")
      ? ", loops heading for crossover"
      : "";
  return `${c.tag} ${state}${locked}${loops}.`;
}

const windowEndingAt = (endMs: number, windowS: number): [number, number] => [endMs - windowS * 1000, endMs];

function Row({ label, value, testId }: { label: string; value: string; testId?: string }) {
  return (
    <div className="flex justify-between gap-3 border-t border-line/60 py-1 first:border-t-0">
      <dt className="text-muted">{label}</dt>
      <dd className="text-right font-semibold tabular-nums" data-testid={testId}>
        {value}
      </dd>
    </div>
  );
}

export function DerivedPanel({
  snapshot,
  marginTrend,
  marginTrendWindowS,
  unitSystem,
  timeZone,
}: {
  snapshot: SiteSnapshot | null;
  marginTrend: Record<string, { tsMs: number[]; marginK: number[] }>;
  /** The window the API took the margin trend from, ending at the site's latest event time. */
  marginTrendWindowS: number;
  unitSystem: UnitSystem;
  timeZone: string;
}) {
  if (!snapshot)
    return <p className="text-muted">No readings yet: derived numbers appear once the site's gateway reports.</p>;
  const scale = unitSystem === "ip" ? 1.8 : 1;
  return (
    <div className="grid gap-3 md:grid-cols-2">
      {/* Read out politely when a chiller's state changes, not on each new value. */}
      <p role="status" className="sr-only" data-testid="plant-summary">
        {snapshot.chillers.map(chillerSummary).join(" ")}
      </p>
      {snapshot.chillers.map((c) => (
        <section key={c.tag} className="rounded-lg border border-line bg-panel p-4" data-testid="chiller-derived">
          <h3 className="flex items-baseline justify-between font-semibold">
            {c.tag}{" "}
            <span className="text-sm font-normal text-muted">
              {c.running === null ? "state unknown" : c.running ? "running" : "off"}
            </span>
          </h3>
          <dl className="mt-2 text-sm">
            <Row
              label="Crossover margin (CW − CHW entering)"
              value={formatDelta(c.crossoverMarginK, unitSystem)}
              testId="margin"
            />
            <Row label="Time to crossover" value={crossoverText(c)} testId="time-to-crossover" />
            <Row
              label="Restart lockout left"
              value={c.lockout.source === "unknown" ? "unknown" : formatDuration(c.lockout.lockoutLeftS)}
              testId="lockout-left"
            />
            <Row
              label="Condenser − evaporator pressure"
              value={formatPressureDelta(c.crossoverPressureMarginKPa, unitSystem)}
            />
            <Row label="Lift (sat. condensing − evaporating)" value={formatDelta(c.liftK, unitSystem)} />
            <Row
              label="Evaporator / condenser approach"
              value={`${formatDelta(c.evaporatorApproachK, unitSystem)} / ${formatDelta(c.condenserApproachK, unitSystem)}`}
            />
            <Row
              label="Evaporator / condenser ΔT"
              value={`${formatDelta(c.evaporatorDeltaTK, unitSystem)} / ${formatDelta(c.condenserDeltaTK, unitSystem)}`}
            />
            <Row
              label="Load"
              value={
                c.loadTons === null
                  ? "—"
                  : `${unitSystem === "ip" ? `${c.loadTons.toFixed(0)} tons` : `${tonsToKw(c.loadTons).toFixed(0)} kW`}${c.flowSource === "design" ? " (design flow)" : ""}`
              }
            />
            {unitSystem === "ip" ? (
              <Row
                label="kW/ton · COP"
                value={c.kwPerTon === null ? "—" : `${c.kwPerTon.toFixed(2)} · ${c.cop?.toFixed(1) ?? "—"}`}
              />
            ) : (
              // SI states efficiency as COP alone (kW of cooling per kW of power).
              <Row label="COP" value={c.cop?.toFixed(1) ?? "—"} />
            )}
          </dl>
          {marginTrend[c.tag]?.tsMs.length ? (
            <div className="mt-3">
              <p className="text-xs text-muted">
                Crossover margin, last hour ({unitSystem === "ip" ? "°F" : "K"}); dashed line = loops crossed
              </p>
              <Sparkline
                xs={marginTrend[c.tag].tsMs}
                ys={marginTrend[c.tag].marginK.map((k) => k * scale)}
                xRangeMs={windowEndingAt(
                  Math.max(marginTrend[c.tag].tsMs.at(-1) ?? 0, c.inputsToMs ?? snapshot.atMs),
                  marginTrendWindowS,
                )}
                label={`${c.tag} crossover margin trend`}
                timeZone={timeZone}
                zeroLine
              />
            </div>
          ) : null}
          <p className="mt-2 text-xs text-muted">
            As of {formatClock(c.inputsToMs ?? snapshot.atMs, timeZone)} site time
          </p>
        </section>
      ))}
      {snapshot.towers.map((t) => (
        <section key={t.tag} className="rounded-lg border border-line bg-panel p-4">
          <h3 className="flex items-baseline justify-between font-semibold">
            {t.tag}{" "}
            <span className="text-sm font-normal text-muted">
              fan {t.fanDriveMode ?? "?"}
              {t.fanRunning === false ? ", not running" : ""}
            </span>
          </h3>
          <dl className="mt-2 text-sm">
            <Row label="Range" value={formatDelta(t.rangeK, unitSystem)} />
            <Row label="Approach to wet bulb" value={formatDelta(t.approachK, unitSystem)} />
          </dl>
          <p className="mt-2 text-xs text-muted">
            As of {formatClock(t.inputsToMs ?? snapshot.atMs, timeZone)} site time
          </p>
        </section>
      ))}
    </div>
  );
}
