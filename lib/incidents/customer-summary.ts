// The customer's plain-language version of an incident in three parts, stored as one text with its
// headings, and a first draft written from the incident for the technician to correct.

import { ruleInWords } from "./grouping";
import type { KeyFigures } from "./key-figures";

export interface CustomerSummaryParts {
  happened: string;
  done: string;
  recommended: string;
}

const headings: Record<keyof CustomerSummaryParts, string> = {
  happened: "What happened",
  done: "What was done",
  recommended: "What we recommend",
};

export function composeCustomerSummary(parts: CustomerSummaryParts): string {
  return (Object.keys(headings) as (keyof CustomerSummaryParts)[])
    .map((k) => `${headings[k]}:\n${parts[k].trim()}`)
    .join("\n\n");
}

/** Reads the three parts back; text without the headings is all "what happened". */
export function parseCustomerSummary(text: string): CustomerSummaryParts {
  const out: CustomerSummaryParts = { happened: "", done: "", recommended: "" };
  const keys = Object.keys(headings) as (keyof CustomerSummaryParts)[];
  const pattern = new RegExp(`^(${keys.map((k) => headings[k]).join("|")}):\\s*$`, "m");
  if (!pattern.test(text)) return { ...out, happened: text.trim() };
  let current: keyof CustomerSummaryParts | null = null;
  for (const line of text.split("\n")) {
    const k = keys.find((key) => line.trim() === `${headings[key]}:`);
    if (k) current = k;
    else if (current) out[current] += (out[current] ? "\n" : "") + line;
  }
  for (const k of keys) out[k] = out[k].trim();
  return out;
}

const minutes = (s: number) => `${Math.round(s / 60)} minutes`;

/** A first draft in plain words (no alarm jargon, no numbers a building owner cannot use). */
export function draftCustomerSummary(input: {
  members: readonly { ruleId: string; equipment: string }[];
  figures: KeyFigures;
  actions: readonly string[];
}): CustomerSummaryParts {
  const rules = new Set(input.members.map((m) => m.ruleId));
  const happened: string[] = [];
  if (rules.has("power_event_suspected"))
    happened.push("A short disturbance in the utility power upset the cooling plant's drives.");
  if (rules.has("tower_fan_not_in_auto") || rules.has("tower_fan_not_running"))
    happened.push("The cooling tower fan did not come back on by itself, so the plant could not reject heat.");
  if (rules.has("chiller_tripped") || rules.has("head_pressure_near_trip"))
    happened.push("The chiller shut itself down to protect itself.");
  if (rules.has("loops_crossed"))
    happened.push(
      "While it waited out its restart timers, the building's chilled water warmed past the tower water, which makes a restart hard.",
    );
  else if (rules.has("crossover_risk") || rules.has("restart_race"))
    happened.push("Our monitoring warned that the chiller might not restart in time, and we acted on that warning.");
  if (!happened.length)
    happened.push(`Our monitoring raised ${input.members.map((m) => ruleInWords(m.ruleId).toLowerCase()).join(", ")}.`);
  const f = input.figures;
  const done = [
    ...(f.timeToAcknowledgeS !== null ? [`Our technician responded within ${minutes(f.timeToAcknowledgeS)}.`] : []),
    ...input.actions.slice(0, 5),
    ...(f.timeToRecoveryS !== null ? [`Cooling was back to normal after ${minutes(f.timeToRecoveryS)}.`] : []),
  ];
  const recommended = rules.has("power_event_suspected")
    ? "Set the tower fan drive to restart in automatic after a power interruption, and review the chiller's restart settings with us."
    : "We will review the cause with you at the next visit.";
  return { happened: happened.join(" "), done: done.join("\n"), recommended };
}
