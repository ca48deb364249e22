import type { Db } from "@/db/client";
import { findAlarmRef } from "@/db/queries/alarms";
import {
  markAcknowledged,
  savePushSubscription,
  smsDeliveriesTo,
  startSmsVerification,
  userIdsByVerifiedPhone,
} from "@/db/queries/notify";
import { alarmsAwaitingAck } from "@/db/queries/oncall";
import { getViewerById } from "@/db/queries/users";
import type { Viewer } from "@/lib/auth/viewer";
import type { PushDeviceDto } from "@/lib/dto/notify";
import { AppError, isAppError } from "@/lib/errors";
import { verificationText } from "@/lib/notify/messages";
import { alarmShortCode, shortCodeInReply } from "@/lib/notify/short-code";
import type { AlarmService } from "../alarms/service";
import type { NotifyPaths } from "./start";

// Use cases that write and reach out in one call: adding a number texts its code, a device's
// subscription is checked against where pushes may go, a text reply acknowledges an alarm.

/** Subscriptions go to a push service over HTTPS; plain HTTP only to the local fake on loopback. */
export function addPushDevice(
  db: Db,
  notify: Pick<NotifyPaths, "pushSink">,
  viewer: Viewer,
  sub: { endpoint: string; keys: { p256dh: string; auth: string }; label: string },
): PushDeviceDto {
  const url = new URL(sub.endpoint);
  if (url.protocol !== "https:" && url.origin !== notify.pushSink.origin)
    throw new AppError("bad_request", "A push endpoint must be an https URL.");
  return savePushSubscription(db, viewer, { endpoint: sub.endpoint, ...sub.keys, label: sub.label });
}

/** Sets the viewer's number and texts it a code; the number takes alarms once the code comes back. */
export async function addSmsNumber(
  db: Db,
  notify: Pick<NotifyPaths, "sms">,
  viewer: Viewer,
  phone: string,
  nowMs: number,
): Promise<void> {
  const code = startSmsVerification(db, viewer, phone, nowMs);
  const sent = await notify.sms.send(phone, verificationText(code));
  if (!sent.ok) throw new AppError("unavailable", `The code could not be texted: ${sent.detail}`);
}

export type InboundResult =
  | { acknowledged: true; alarmId: string; userId: string }
  | { acknowledged: false; reason: "unknown_sender" | "no_code" | "unknown_code" };

/**
 * A reply from a verified number: the alarm's short code acknowledges it for that person, if the
 * alarm was texted to this number and still waits. Anything else is refused and told so.
 */
export async function acknowledgeBySms(
  db: Db,
  notify: Pick<NotifyPaths, "sms">,
  service: AlarmService,
  message: { from: string; text: string },
  nowMs: number,
): Promise<InboundResult> {
  const reply = (text: string) => void notify.sms.send(message.from, text).catch(() => undefined);
  const userIds = userIdsByVerifiedPhone(db, message.from);
  if (userIds.length === 0) return { acknowledged: false, reason: "unknown_sender" };
  const code = shortCodeInReply(message.text);
  if (!code) {
    reply("Liftline: reply with the alarm's code to acknowledge it.");
    return { acknowledged: false, reason: "no_code" };
  }
  const waiting = new Map(alarmsAwaitingAck(db, 4).map((a) => [a.id, a.activations]));
  const match = smsDeliveriesTo(db, userIds, message.from).find(
    (d) => waiting.get(d.alarmId) === d.activation && alarmShortCode(d.alarmId, d.activation) === code,
  );
  if (!match) {
    reply(`Liftline: no alarm waits for code ${code}. Nothing was acknowledged.`);
    return { acknowledged: false, reason: "unknown_code" };
  }
  const viewer = getViewerById(db, match.userId);
  if (!viewer || !findAlarmRef(db, viewer, match.alarmId)) return { acknowledged: false, reason: "unknown_code" };
  try {
    service.command(viewer, match.alarmId, { type: "acknowledge", note: "Acknowledged by text reply" });
  } catch (err) {
    // Acknowledged meanwhile on another path: the reply did its job.
    if (!(isAppError(err) && err.code === "conflict")) throw err;
  }
  markAcknowledged(db, {
    alarmId: match.alarmId,
    activation: match.activation,
    userId: match.userId,
    path: "sms",
    atMs: nowMs,
  });
  reply(`Liftline: acknowledged (${code}). Escalation stopped.`);
  return { acknowledged: true, alarmId: match.alarmId, userId: match.userId };
}
