// The shapes screens and the API read for the service call.

export type ServiceRequestState = "received" | "assigned" | "on_the_way" | "done" | "cancelled";
export type TemporaryChangeKind =
  "controller_setting" | "safety_bypassed" | "drive_in_hand_or_off" | "load_shed" | "valve_by_hand" | "other";

export interface ServiceRequestDto {
  id: string;
  siteId: string;
  siteName: string;
  siteTimeZone: string;
  requestedBy: string;
  description: string;
  urgency: "not_urgent" | "today" | "now";
  callbackPhone: string;
  state: ServiceRequestState;
  assignedTo: { id: string; name: string } | null;
  /** The state in plain words for the customer. */
  stateText: string;
  /** The visit that took this request, when one did. */
  visitId: string | null;
  createdAt: number;
  updatedAt: number;
}

/** The plant's key numbers at one moment: derived values and the latest value of every point. */
export interface VisitSnapshot {
  atMs: number;
  derived: unknown;
  points: Array<{
    equipmentTag: string;
    quantity: string;
    value: number | boolean | string | null;
    display: string;
    tsMs: number | null;
    stale: boolean;
  }>;
}

export interface VisitEntryDto {
  id: number;
  at: number;
  author: string;
  text: string;
  fileId: string | null;
}

export interface LiveCheckDto {
  /** The latest reading of the point that shows the setting, as displayed. */
  reading: string;
  readingAtMs: number | null;
  /** The reading in canonical units, when numeric. */
  readingValue: number | null;
  /** Whether the reading matches the value the change should be put back to (null: cannot tell). */
  matchesPutBack: boolean | null;
  message: string;
}

export interface TemporaryChangeDto {
  id: string;
  visitId: string;
  siteId: string;
  equipmentId: string | null;
  equipmentTag: string | null;
  equipmentName: string | null;
  kind: TemporaryChangeKind;
  what: string;
  pointQuantity: string | null;
  fromValue: string;
  toValue: string;
  reason: string;
  madeBy: string;
  madeAt: number;
  putBackDueAt: number;
  putBackAt: number | null;
  putBackBy: string | null;
  valueNow: string | null;
  reminders: number;
  escalatedAt: number | null;
  /** What the customer reads. */
  plainText: string;
  liveCheck: LiveCheckDto | null;
}

export interface VisitAlarmDto {
  id: string;
  ruleId: string;
  equipment: string;
  priority: number;
  state: string;
  title: string;
}

export interface VisitDto {
  id: string;
  siteId: string;
  siteName: string;
  siteTimeZone: string;
  technician: { id: string; name: string };
  mode: "on_site" | "remote";
  origin: "alarm" | "service_request" | "planned";
  serviceRequestId: string | null;
  openedAt: number;
  arrivedAt: number | null;
  departedAt: number | null;
  closedAt: number | null;
  summary: string | null;
  partsUsed: Array<{ part: string; quantity: number }>;
  openChangesNote: string | null;
  openChangesOwner: { id: string; name: string } | null;
  /** Staff only (null for a customer): the running log and the before/after numbers are internal. */
  entries: VisitEntryDto[] | null;
  openSnapshot: VisitSnapshot | null;
  closeSnapshot: VisitSnapshot | null;
  alarms: VisitAlarmDto[];
  changes: TemporaryChangeDto[];
}

export type VisitSummaryDto = Omit<VisitDto, "entries" | "openSnapshot" | "closeSnapshot" | "alarms" | "changes">;

/** A customer's report sent for a visit. */
export interface VisitReportDto {
  id: number;
  visitId: string;
  siteId: string;
  visitOpenedAt: number;
  visitClosedAt: number | null;
  sentAt: number;
  sentBy: string;
  recipients: string[];
}
