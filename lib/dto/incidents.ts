import type { KeyFigures } from "@/lib/incidents/key-figures";
import type { TimelineEntry } from "@/lib/incidents/timeline";

export type IncidentState = "open" | "resolved" | "reviewed";

export interface IncidentMemberDto {
  alarmId: string;
  activeSinceMs: number;
  clearedAtMs: number | null;
  ruleId: string;
  equipment: string;
  priority: number;
}

export interface IncidentSummaryDto {
  id: string;
  siteId: string;
  siteName: string;
  siteTimeZone: string;
  title: string;
  state: IncidentState;
  startedAtMs: number;
  endedAtMs: number | null;
  rootHint: string | null;
  alarmCount: number;
  shared: boolean;
}

export interface IncidentDto extends IncidentSummaryDto {
  titleByPerson: boolean;
  /** Staff only (empty for customers): the team's own words. */
  cause: string;
  lesson: string;
  customerSummary: string;
  sharedWithCustomerAt: number | null;
  members: IncidentMemberDto[];
}

export interface TrendSeriesDto {
  label: string;
  equipment: string;
  quantity: string;
  /** Event time, ms. */
  tsMs: number[];
  /** In the viewer's units. */
  values: (number | null)[];
}

export interface TrendPanelDto {
  id: string;
  title: string;
  unit: string;
  series: TrendSeriesDto[];
  /** Horizontal lines: a warning threshold, zero margin. */
  thresholds: { label: string; value: number }[];
  /** State panels show 0/1 (or the mode's index) as steps with these names. */
  stateNames?: string[];
}

export interface IncidentReviewDto {
  incident: IncidentDto;
  /** The window the review covers (event time). */
  fromMs: number;
  toMs: number;
  timeline: TimelineEntry[];
  panels: TrendPanelDto[];
  keyFigures: KeyFigures;
  unitSystem: "ip" | "si";
}
