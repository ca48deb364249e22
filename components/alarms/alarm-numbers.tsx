import { formatClock, formatDelta, formatPressureDelta } from "@/lib/client/format";
import { formatDuration, formatValue, type UnitSystem } from "@/lib/units";
import { KW_PER_TON } from "@/lib/plant/units";

// Rule numbers carry their unit in the name (marginK, timeToCrossoverS, condenserPressureKPa);
// each known key gets a label and a formatter in the viewer's units.
type Format = (v: number, system: UnitSystem, timeZone?: string) => string;

const delta: Format = (v, s) => formatDelta(v, s);
const deltaPerMin: Format = (v, s) => `${formatDelta(v, s, 2)}/min`;
const duration: Format = (v) => formatDuration(v);
const temp: Format = (v, s) => formatValue(v, "temperature", s);
const pressure: Format = (v, s) => formatValue(v, "pressure", s);
const pressureDelta: Format = (v, s) => formatPressureDelta(v, s);
const pressurePerMin: Format = (v, s) => `${formatPressureDelta(v, s)}/min`;
const clock: Format = (v, _s, tz) => formatClock(v, tz);
const yesNo: Format = (v) => (v ? "yes" : "no");
const plain: Format = (v) => (Number.isInteger(v) ? String(v) : v.toFixed(2));
/** kW/ton in IP; SI states efficiency as COP (1 ton = 3.516853 kW, so COP = 3.516853 / kW per ton). */
const efficiency: Format = (v, s) => (s === "ip" ? `${v.toFixed(2)} kW/ton` : `COP ${(KW_PER_TON / v).toFixed(1)}`);
const percent: Format = (v) => `${(v <= 1 ? v * 100 : v).toFixed(0)} %`;

const known: Record<string, [string, Format]> = {
  marginK: ["Crossover margin", delta],
  measuredMarginK: ["Measured margin", delta],
  pressureMarginKPa: ["Condenser − evaporator pressure", pressureDelta],
  timeToCrossoverS: ["Time to crossover", duration],
  timeToCrossoverEarliestS: ["Earliest crossover", duration],
  timeToCrossoverLatestS: ["Latest crossover", duration],
  closingRateKPerMin: ["Margin closing at", deltaPerMin],
  fitResidualK: ["Fit spread (σ)", delta],
  lockoutLeftS: ["Restart lockout left", duration],
  loadTimeS: ["Time to load", duration],
  driveTempC: ["Drive temperature", temp],
  tripC: ["Trip at", temp],
  riseKPerMin: ["Rising at", deltaPerMin],
  timeToTripS: ["Time to trip", duration],
  timeToTripEarliestS: ["Earliest trip", duration],
  condenserPressureKPa: ["Condensing pressure", pressure],
  tripKPa: ["Trip setting", pressure],
  riseKPaPerMin: ["Rising at", pressurePerMin],
  evaporatorSaturatedC: ["Evaporator saturated", temp],
  limitC: ["Limit", temp],
  condenserWaterC: ["Condenser water", temp],
  setpointC: ["Setpoint", temp],
  aboveSetpointK: ["Above setpoint", delta],
  fanSpeedPct: ["Fan speed", percent],
  faultedDrives: ["Drives faulted", plain],
  firstFaultMs: ["First fault", clock],
  lastFaultMs: ["Last fault", clock],
  lastReadingMs: ["Last reading", clock],
  ageS: ["Silent for", duration],
  latchedAlarm: ["Latched alarm", yesNo],
  driveFault: ["Drive fault", yesNo],
  kwPerTon: ["Efficiency (averaged)", efficiency],
  baselineKwPerTon: ["Baseline efficiency", efficiency],
  condenserApproachK: ["Condenser approach", delta],
  baselineCondenserApproachK: ["Baseline approach", delta],
  coverage: ["Data coverage", percent],
  startMarginK: ["Start margin needed", delta],
  refrigerantBasis: ["Judged on", (v) => (v ? "shell pressures" : "water temperatures")],
  compressorLoadS: ["Time to load after a start", duration],
  restartNeedsS: ["Back on load in", duration],
  restartInS: ["Restart possible in", duration],
  leavingC: ["Chilled water leaving", temp],
  cutoutC: ["Cut-out", temp],
  fallKPerMin: ["Falling at", deltaPerMin],
  driveInOff: ["Fan drive in off", yesNo],
  driveInHand: ["Fan drive in hand", yesNo],
  failedSensors: ["Failed sensors", plain],
  evaporatorFlowShare: ["Evaporator flow, share of design", percent],
  condenserFlowShare: ["Condenser flow, share of design", percent],
  evaporatorWaterDpKPa: ["Evaporator water ΔP", pressureDelta],
  condenserWaterDpKPa: ["Condenser water ΔP", pressureDelta],
  evaporatorDesignDpKPa: ["Evaporator ΔP at design flow", pressureDelta],
  condenserDesignDpKPa: ["Condenser ΔP at design flow", pressureDelta],
  running: ["Compressor running", yesNo],
  commanded: ["Commanded on", yesNo],
  proven: ["Run proven", yesNo],
  faulted: ["Drive fault", yesNo],
};

function describe(key: string): [string, Format] {
  if (known[key]) return known[key];
  const words = key.replace(/([A-Z])/g, " $1").toLowerCase();
  const label = words.charAt(0).toUpperCase() + words.slice(1);
  if (key.endsWith("S")) return [label, duration];
  if (key.endsWith("K")) return [label, delta];
  if (key.endsWith("C")) return [label, temp];
  return [label, plain];
}

/** A rule number's label in words ("marginK" → "Crossover margin"). */
export function numberLabel(key: string): string {
  return describe(key)[0];
}

export function formatNumber(key: string, value: number | null, system: UnitSystem, timeZone?: string): string {
  return value === null ? "—" : describe(key)[1](value, system, timeZone);
}

export function AlarmNumbers({
  numbers,
  unitSystem,
  timeZone,
}: {
  numbers: Record<string, number | null>;
  unitSystem: UnitSystem;
  timeZone?: string;
}) {
  const entries = Object.entries(numbers).filter(([, v]) => v !== null);
  if (!entries.length) return null;
  return (
    <dl className="grid grid-cols-2 gap-x-4 gap-y-1 text-sm sm:grid-cols-3">
      {entries.map(([k, v]) => (
        <div key={k}>
          <dt className="text-muted">{describe(k)[0]}</dt>
          <dd className="font-semibold tabular-nums" data-number={k}>
            {formatNumber(k, v, unitSystem, timeZone)}
          </dd>
        </div>
      ))}
    </dl>
  );
}
