import type { AlarmState } from "@/lib/alarms/states";
import type { Condition } from "@/lib/rules/condition";

/** The latest condition's words and numbers, as of the evaluation at `atMs` (event time). */
export type AlarmDetail = Pick<
  Condition,
  "technicianMessage" | "ownerMessage" | "advice" | "caution" | "numbers" | "related" | "atMs"
>;

export interface AlarmDto {
  id: string;
  siteId: string;
  siteName: string;
  /** The site's IANA zone: alarm times read in site time wherever they are listed. */
  siteTimeZone: string;
  ruleId: string;
  equipment: string;
  priority: number;
  state: AlarmState;
  conditionActive: boolean;
  activeSinceMs: number | null;
  lastTransitionMs: number | null;
  activations: number;
  shelvedUntilMs: number | null;
  /** The technician's reason for shelving; customers do not see it (null). */
  shelveReason: string | null;
  detail: AlarmDetail;
}

export interface AlarmEventDto {
  id: number;
  from: string;
  to: string;
  cause: string;
  eventAtMs: number;
  wallAtMs: number;
  actor: string | null;
  /** Event notes are the technicians' words; customers do not see them. */
  note: string | null;
}

export interface AlarmNoteDto {
  id: number;
  author: string;
  text: string;
  visibility: "internal" | "customer";
  createdAt: number;
}

export interface AlarmWithHistoryDto extends AlarmDto {
  /** The words and numbers when the current (or last) activation was raised; null on rows stored before they were kept. */
  raisedDetail: AlarmDetail | null;
  events: AlarmEventDto[];
  notes: AlarmNoteDto[];
}
