// Rule 7: utility power event suspected — two or more drives faulting within a short window.
// A root-cause hint: one blip faults every drive at once, so the faults share a cause.
// A drive's fault can clear before the gateway samples it; a fan drive that reboots into
// "off" on its own is the other trace the same blip leaves, so it counts too.

import type { QuantityKey } from "@/lib/quantities";
import { SITE_TAG, type Condition } from "./condition";
import { str, type RuleContext } from "./context";
import { makeCondition } from "./make-condition";

interface Fault {
  tag: string;
  point: QuantityKey;
  atMs: number;
  what: string;
}

/** "14:03:05 CDT": the site's own clock, as its people and its controllers' logs read it. */
function clockTime(atMs: number, timeZone = "UTC"): string {
  return new Date(atMs).toLocaleTimeString("en-US", {
    hourCycle: "h23",
    hour: "2-digit",
    minute: "2-digit",
    second: "2-digit",
    timeZone,
    timeZoneName: "short",
  });
}

export function powerEventSuspected(ctx: RuleContext): Condition[] {
  const s = ctx.settings.powerEvent;
  if (!s.enabled) return [];
  const drives = ctx.site.flatMap((e): { tag: string; point: QuantityKey }[] =>
    e.kind === "chiller"
      ? [{ tag: e.tag, point: "drive_fault" }]
      : e.kind === "cooling_tower"
        ? [{ tag: e.tag, point: "fan_drive_fault" }]
        : [],
  );
  const sinceMs = ctx.nowMs - (s.holdS + s.windowS) * 1000;
  const faults: Fault[] = drives
    .flatMap((d): Fault[] => {
      const label = d.point === "drive_fault" ? "compressor drive fault" : "fan drive fault";
      const rises = ctx.history.edges(d.tag, d.point, ctx.nowMs).rises.map((atMs) => ({ ...d, atMs, what: label }));
      const toOff =
        d.point === "fan_drive_fault"
          ? ctx.history
              .changes(d.tag, "fan_drive_mode", ctx.nowMs)
              .filter((c) => c.to === "off")
              .map((c) => ({ ...d, atMs: c.tsMs, what: "fan drive changed to off" }))
          : [];
      return [...rises, ...toOff].filter((f) => f.atMs >= sinceMs);
    })
    .sort((a, b) => a.atMs - b.atMs);

  // The newest group of faults on distinct drives within the window.
  let group: Fault[] = [];
  for (let i = 0; i < faults.length; i++) {
    const inWindow = faults.filter((f) => f.atMs >= faults[i].atMs && f.atMs <= faults[i].atMs + s.windowS * 1000);
    if (new Set(inWindow.map((f) => f.tag)).size >= s.minDrives) group = inWindow;
  }
  const lastMs = group.length ? group[group.length - 1].atMs : null;
  const active = lastMs !== null && ctx.nowMs - lastMs <= s.holdS * 1000;
  const names = group.map((f) => {
    const text = str(ctx, f.tag, "fault_text");
    return `${f.tag} ${f.what} at ${clockTime(f.atMs, ctx.timeZone)}${text && text !== "none" ? ` (${text})` : ""}`;
  });
  return [
    makeCondition({
      ruleId: "power_event_suspected",
      equipment: SITE_TAG,
      active,
      priority: s.priority,
      atMs: ctx.nowMs,
      technicianMessage: active
        ? `Utility power event suspected: ${new Set(group.map((f) => f.tag)).size} drives faulted within ${s.windowS} s — ${names.join("; ")}.`
        : "No correlated drive faults.",
      ownerMessage: active
        ? "Several machines stopped at the same moment, likely from a brief power interruption."
        : "No sign of a power interruption.",
      advice: active
        ? [
            "Check every drive's mode after the power returns: a drive may come back in off rather than auto.",
            "Check that the chillers, pumps and tower fans restarted as they should.",
          ]
        : [],
      numbers: {
        faultedDrives: active ? new Set(group.map((f) => f.tag)).size : 0,
        firstFaultMs: group[0]?.atMs ?? null,
        lastFaultMs: lastMs,
      },
      related: active ? names : [],
    }),
  ];
}
