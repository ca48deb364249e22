import { formatDelta, formatDuration, formatPressureDelta } from "@/lib/client/format";
import { formatValue, type UnitSystem } from "@/lib/units";

// Rule numbers carry their unit in the name (marginK, timeToCrossoverS, headroomKPa, driveTempC).
const labels: Record<string, string> = {
  marginK: "Crossover margin",
  timeToCrossoverS: "Time to crossover",
  timeToCrossoverLowS: "Earliest crossover",
  lockoutLeftS: "Restart lockout left",
  loadTimeS: "Time to load",
  pressureMarginKPa: "Condenser − evaporator pressure",
};

function label(key: string): string {
  if (labels[key]) return labels[key];
  const words = key.replace(/(KPa|K|S|C|Kw|Pct)$/, "").replace(/([A-Z])/g, " $1").toLowerCase();
  return words.charAt(0).toUpperCase() + words.slice(1);
}

export function formatNumber(key: string, value: number | null, system: UnitSystem): string {
  if (value === null) return "—";
  if (key.endsWith("KPa")) return key.toLowerCase().includes("pressure") && !key.toLowerCase().includes("margin") && !key.toLowerCase().includes("headroom") ? formatValue(value, "pressure", system) : formatPressureDelta(value, system);
  if (key.endsWith("K")) return formatDelta(value, system);
  if (key.endsWith("S")) return formatDuration(value);
  if (key.endsWith("C")) return formatValue(value, "temperature", system);
  return Number.isInteger(value) ? String(value) : value.toFixed(2);
}

export function AlarmNumbers({ numbers, unitSystem }: { numbers: Record<string, number | null>; unitSystem: UnitSystem }) {
  const entries = Object.entries(numbers).filter(([, v]) => v !== null);
  if (!entries.length) return null;
  return (
    <dl className="grid grid-cols-2 gap-x-4 gap-y-1 text-sm sm:grid-cols-3">
      {entries.map(([k, v]) => (
        <div key={k}>
          <dt className="text-muted">{label(k)}</dt>
          <dd className="font-semibold tabular-nums" data-number={k}>
            {formatNumber(k, v, unitSystem)}
          </dd>
        </div>
      ))}
    </dl>
  );
}
