import { KPA_PER_PSI } from "@/lib/plant/units";
import { deltaFromCanonical, type UnitSystem } from "@/lib/units";

// Display helpers shared by pages: temperature differences and times.

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
  return new Date(ms).toLocaleString("en-US", {
    month: "short",
    day: "numeric",
    hour: "2-digit",
    minute: "2-digit",
    timeZone,
  });
}
