import { KPA_PER_PSI } from "@/lib/plant/units";
import { deltaFromCanonical, type UnitSystem } from "@/lib/units";

// Display helpers shared by pages: durations, temperature differences and times.

export function formatDuration(seconds: number | null | undefined): string {
  if (seconds === null || seconds === undefined || !Number.isFinite(seconds)) return "—";
  const s = Math.max(0, Math.round(seconds));
  if (s < 90) return `${s} s`;
  const m = Math.round(s / 60);
  if (m < 90) return `${m} min`;
  const h = Math.floor(m / 60);
  return m % 60 ? `${h} h ${m % 60} min` : `${h} h`;
}

/** A temperature difference (K) in the viewer's units: °F differences are 1.8 × K. */
export function formatDelta(k: number | null | undefined, system: UnitSystem, digits = 1): string {
  if (k === null || k === undefined || !Number.isFinite(k)) return "—";
  return `${deltaFromCanonical(k, system).toFixed(digits)} ${system === "ip" ? "°F" : "K"}`;
}

export function formatPressureDelta(kPa: number | null | undefined, system: UnitSystem): string {
  if (kPa === null || kPa === undefined || !Number.isFinite(kPa)) return "—";
  return system === "ip" ? `${(kPa / KPA_PER_PSI).toFixed(1)} psi` : `${kPa.toFixed(0)} kPa`;
}

export function formatClock(ms: number | null | undefined, timeZone?: string): string {
  if (ms === null || ms === undefined || !Number.isFinite(ms)) return "—";
  return new Date(ms).toLocaleTimeString("en-US", { hour: "2-digit", minute: "2-digit", second: "2-digit", timeZone });
}

export function formatDateTime(ms: number | null | undefined, timeZone?: string): string {
  if (ms === null || ms === undefined || !Number.isFinite(ms)) return "—";
  return new Date(ms).toLocaleString("en-US", { month: "short", day: "numeric", hour: "2-digit", minute: "2-digit", timeZone });
}

export function formatAge(ms: number, nowMs: number): string {
  return `${formatDuration((nowMs - ms) / 1000)} ago`;
}
