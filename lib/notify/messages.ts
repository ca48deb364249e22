import { priorityMeanings, type Priority } from "@/lib/alarms";

// What a push notification and a text message say. Short, and no customer data beyond the site
// and the equipment tag: a lock screen and a phone bill are read by others.

export interface AlarmNotice {
  alarmId: string;
  siteName: string;
  equipment: string;
  priority: number;
  /** The alarm in one line (the technician's message). */
  line: string;
}

export interface PushPayload {
  title: string;
  body: string;
  alarmId: string;
  site: string;
  equipment: string;
  priority: number;
  priorityLabel: string;
  /** Opens the alarm. */
  url: string;
  /** POST here acknowledges (single use, expiring, bound to this alarm and person). */
  ackUrl: string;
}

const priorityLabel = (p: number) => {
  const label = priorityMeanings[p as Priority]?.label ?? `P${p}`;
  return label.charAt(0).toUpperCase() + label.slice(1);
};

/** Push services take at most 4096 bytes of encrypted payload (RFC 8030 §7.2); keep well under. */
export const MAX_PUSH_LINE = 140;

export function pushPayload(notice: AlarmNotice, urls: { open: string; ack: string }): PushPayload {
  const line = notice.line.length > MAX_PUSH_LINE ? `${notice.line.slice(0, MAX_PUSH_LINE - 1)}…` : notice.line;
  return {
    title: `${priorityLabel(notice.priority)} · ${notice.siteName}`,
    body: `${notice.equipment}: ${line}`,
    alarmId: notice.alarmId,
    site: notice.siteName,
    equipment: notice.equipment,
    priority: notice.priority,
    priorityLabel: priorityLabel(notice.priority),
    url: urls.open,
    ackUrl: urls.ack,
  };
}

/** One SMS segment where it can be (160 GSM-7 characters, 3GPP TS 23.038). */
export function smsText(notice: AlarmNotice, shortCode: string): string {
  const head = `Liftline P${notice.priority} ${notice.siteName} ${notice.equipment}: `;
  const tail = ` Reply ${shortCode} to acknowledge.`;
  const room = Math.max(20, 160 - head.length - tail.length);
  const line = notice.line.length > room ? `${notice.line.slice(0, room - 1)}…` : notice.line;
  return `${head}${line}${tail}`;
}

export function verificationText(code: string): string {
  return `Liftline: your verification code is ${code}. It expires in 10 minutes.`;
}
