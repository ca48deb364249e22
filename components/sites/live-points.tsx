"use client";

import Link from "next/link";
import { useEffect, useState, useSyncExternalStore } from "react";
import type { EquipmentPointsView } from "@/lib/dto/sites";
import { formatDuration, formatValue, type UnitSystem } from "@/lib/units";
import { useSiteValues } from "@/components/realtime/use-site-values";
import { isStale } from "@/lib/freshness";
import { tonsToKw } from "@/lib/plant/units";

const kindLabel: Record<string, string> = {
  chiller: "Chiller",
  cooling_tower: "Cooling tower",
  pump: "Pump",
  air_handler: "Air handler",
  weather_station: "Weather station",
};
const dataLabel = {
  live: "Live",
  stale: "Stale: some points stopped updating",
  offline: "Gateway offline: no data",
  no_gateway: "No gateway: no data",
} as const;

/** Wider than a phone (Tailwind's md breakpoint): equipment sections start open there. */
const WIDE_QUERY = "(min-width: 768px)";

function useWide(): boolean {
  return useSyncExternalStore(
    (changed) => {
      const q = window.matchMedia(WIDE_QUERY);
      q.addEventListener("change", changed);
      return () => q.removeEventListener("change", changed);
    },
    () => window.matchMedia(WIDE_QUERY).matches,
    // The server renders for a phone: sections collapsed.
    () => false,
  );
}

/**
 * Every equipment's points with live values, age and stale marks; each opens its trend. Sections
 * start collapsed on a phone and open on wider screens; staff can show the technical identifiers.
 */
export function LivePoints({
  siteId,
  equipment,
  unitSystem,
  showIdentifiers,
}: {
  siteId: string;
  equipment: EquipmentPointsView[];
  unitSystem: UnitSystem;
  /** Staff only: offers the toggle for point keys and Brick classes. */
  showIdentifiers: boolean;
}) {
  const { latest, pushed: live } = useSiteValues(siteId, 30_000);
  const [nowMs, setNowMs] = useState(() => Date.now());
  const [identifiers, setIdentifiers] = useState(false);
  const wide = useWide();
  useEffect(() => {
    const t = setInterval(() => setNowMs(Date.now()), 5000);
    return () => clearInterval(t);
  }, []);

  const byId = new Map((latest?.points ?? []).map((p) => [p.pointId, p]));
  const status = latest?.data;
  return (
    <div className="flex flex-col gap-3">
      <div className="flex flex-wrap items-center justify-between gap-2">
        {status && status !== "live" ? (
          // Said once at the top of the page while live; repeated here only when something is wrong.
          <p
            className="rounded border-2 border-stale px-3 py-1 text-sm font-semibold"
            data-testid="site-data-status"
            // A polite live region: read out when the data status changes, never on each value.
            role="status"
          >
            ⚠ {dataLabel[status]}
          </p>
        ) : (
          <span />
        )}
        {showIdentifiers ? (
          <label className="flex items-center gap-2 text-sm">
            <input
              type="checkbox"
              checked={identifiers}
              onChange={(e) => setIdentifiers(e.target.checked)}
              data-testid="identifiers-toggle"
            />
            Show point keys and Brick classes
          </label>
        ) : null}
      </div>
      {equipment.map((e) => (
        <EquipmentSection
          key={e.id}
          equipment={e}
          defaultOpen={wide}
          unitSystem={unitSystem}
          historyHref={showIdentifiers ? `/sites/${siteId}/equipment/${encodeURIComponent(e.id)}` : undefined}
          render={(p) => {
            const latest = byId.get(p.id);
            const pushed = live[p.id];
            const tsMs = pushed?.tsMs ?? latest?.tsMs ?? null;
            const value = pushed ? pushed.value : (latest?.value ?? null);
            const stale = tsMs === null || isStale(tsMs, p.expectedIntervalS, nowMs) || status === "offline";
            return (
              <tr
                key={p.id}
                className="border-t border-line/60 first:border-t-0"
                data-testid="point-row"
                data-point={p.identifiers?.key}
                data-label={p.label}
                data-equipment={e.tag}
              >
                <th scope="row" className="px-3 py-1.5 text-left font-normal">
                  <Link href={`/sites/${siteId}/points/${p.id}`} className="hover:underline">
                    {p.label}
                  </Link>
                  {identifiers && p.identifiers ? (
                    <span className="block break-all font-mono text-xs text-muted" data-testid="point-identifiers">
                      {p.identifiers.key} · {p.identifiers.brickClass}
                    </span>
                  ) : null}
                </th>
                <td
                  className={`px-3 py-1.5 text-right tabular-nums ${stale ? "text-muted" : "font-semibold"}`}
                  data-testid="point-value"
                >
                  {tsMs === null ? "no data" : formatValue(value, p.measure, unitSystem)}
                </td>
                <td className="whitespace-nowrap px-3 py-1.5 text-right text-xs text-muted">
                  {tsMs === null ? (
                    ""
                  ) : stale ? (
                    <span className="rounded border border-dashed border-stale px-1.5 py-0.5">
                      stale · {formatDuration((nowMs - tsMs) / 1000)}
                    </span>
                  ) : (
                    `${formatDuration((nowMs - tsMs) / 1000)} ago`
                  )}
                </td>
              </tr>
            );
          }}
        />
      ))}
    </div>
  );
}

function EquipmentSection({
  equipment: e,
  defaultOpen,
  unitSystem,
  historyHref,
  render,
}: {
  equipment: EquipmentPointsView;
  defaultOpen: boolean;
  unitSystem: UnitSystem;
  /** Staff: the equipment's history page. */
  historyHref?: string;
  render: (p: EquipmentPointsView["points"][number]) => React.ReactNode;
}) {
  // Follows the screen until someone opens or closes it.
  const [toggled, setToggled] = useState<boolean | null>(null);
  const open = toggled ?? defaultOpen;
  return (
    <details
      open={open}
      onToggle={(ev) => setToggled(ev.currentTarget.open)}
      className="rounded-lg border border-line bg-panel"
      data-testid="equipment"
      data-equipment={e.tag}
      id={`equipment-${encodeURIComponent(e.tag)}`}
    >
      <summary
        className="flex cursor-pointer flex-wrap items-baseline gap-x-3 px-4 py-2"
        data-testid="equipment-toggle"
      >
        <h3 className="inline font-semibold">
          {e.tag} <span className="font-normal text-muted">{e.name}</span>
        </h3>
        <span className="text-sm text-muted">
          {[
            kindLabel[e.kind] ?? e.kind,
            e.capacityTons
              ? unitSystem === "ip"
                ? `${e.capacityTons} tons`
                : `${Math.round(tonsToKw(e.capacityTons))} kW`
              : null,
            e.refrigerant,
            e.serves ? `serves ${e.serves}` : null,
            `${e.points.length} points`,
          ]
            .filter(Boolean)
            .join(" · ")}
        </span>
      </summary>
      <table className="w-full border-t border-line text-sm" aria-label={`${e.tag} points`}>
        <thead className="sr-only">
          <tr>
            <th scope="col">Point</th>
            <th scope="col">Value</th>
            <th scope="col">Age</th>
          </tr>
        </thead>
        <tbody>{e.points.map(render)}</tbody>
      </table>
      {historyHref ? (
        <p className="border-t border-line px-4 py-2 text-sm">
          <Link href={historyHref} className="underline" data-testid="equipment-history-link">
            {e.tag} history: alarms, faults, starts, visits and changes
          </Link>
        </p>
      ) : null}
    </details>
  );
}
