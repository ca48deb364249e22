// Four alarm priorities. Meanings follow the split ISA-18.2 recommends (about 80 / 15 / 5 %
// low / medium / high, under 1 % for a fourth, highest level) and line up with ASHRAE
// Guideline 36's levels 2–4 (level 1, life safety, belongs to life-safety systems, not here).
// REFERENCES.md §7.

export const priorities = [1, 2, 3, 4] as const;
export type Priority = (typeof priorities)[number];

export interface PriorityMeaning {
  label: string;
  /** What the on-call technician is expected to do. */
  response: string;
  /** Share of all alarms the guidance aims for, as a fraction. */
  targetShare: { max: number } | { approx: number };
  guideline36Level: 2 | 3 | 4;
}

export const priorityMeanings: Record<Priority, PriorityMeaning> = {
  1: {
    label: "critical",
    response: "Equipment damage or loss of cooling is imminent; act now, by phone or on site.",
    targetShare: { max: 0.01 },
    guideline36Level: 2,
  },
  2: {
    label: "high",
    response: "Trouble within minutes unless someone acts; respond within about 10 minutes.",
    targetShare: { approx: 0.05 },
    guideline36Level: 3,
  },
  3: {
    label: "medium",
    response: "Needs attention this shift; look within the hour.",
    targetShare: { approx: 0.15 },
    guideline36Level: 4,
  },
  4: {
    label: "low",
    response: "Maintenance item; plan it into the next visit.",
    targetShare: { approx: 0.8 },
    guideline36Level: 4,
  },
};
