import type { NotificationPath } from "@/lib/notify/policy";

export interface PushDeviceDto {
  id: string;
  label: string;
  /** The push service's host only: the full endpoint is a credential of sorts. */
  service: string;
  createdAt: number;
  lastSuccessAt: number | null;
}

export interface SmsNumberDto {
  phone: string;
  verified: boolean;
  alarmsEnabled: boolean;
  /** A code was sent and is still valid. */
  codePending: boolean;
}

export interface PolicyDto {
  priority: number;
  paths: NotificationPath[];
  backupAfterS: number | null;
  adminsAfterS: number | null;
  /** The default's reason (shown beside it). */
  reason: string;
  isDefault: boolean;
  updatedAt: number | null;
  updatedBy: string | null;
}

export interface DeliveryDto {
  id: number;
  activation: number;
  step: number;
  person: string;
  path: NotificationPath;
  target: string;
  status: "sent" | "delivered" | "failed" | "acknowledged";
  detail: string | null;
  sentAt: number;
  statusAt: number;
}

export interface CalendarFeedDto {
  id: string;
  createdAt: number;
  revokedAt: number | null;
}

export interface PreferencesDto {
  alarmStartEndMail: boolean;
  serviceRequestMail: boolean;
}

export interface SmsMessageDto {
  id: number;
  direction: "outbound" | "inbound";
  from: string;
  to: string;
  body: string;
  receivedAt: number;
}
