import { z } from "zod";
import { getDb } from "@/lib/server/runtime";
import { consumeAckLink } from "@/db/queries/oncall";
import { markAcknowledged } from "@/db/queries/notify";
import { ackLinkQuerySchema } from "@/lib/schemas/notify";
import { getViewerById } from "@/db/queries/users";
import { getAlarm } from "@/db/queries/alarms";
import { AppError, isAppError } from "@/lib/errors";
import { ackLinkRefusal as refusal, ACK_TOKEN_PATTERN } from "@/lib/oncall/ack-link";
import { route } from "@/lib/server/http";
import { requireAlarmService } from "@/lib/server/runtime";

const tokenSchema = z.string().regex(ACK_TOKEN_PATTERN);

// The e-mailed or pushed link is the credential: it names one alarm and one person, works once,
// and expires. GET never acts (mail scanners prefetch links); the page and the service worker's
// Acknowledge action POST here (`?via=push` from the notification).
export const POST = route<{ params: Promise<{ token: string }> }>(async (request, { params }) => {
  const { via } = ackLinkQuerySchema.parse(Object.fromEntries(new URL(request.url).searchParams));
  const parsed = tokenSchema.safeParse((await params).token);
  if (!parsed.success) throw new AppError("not_found", refusal.unknown);
  const db = getDb();
  const link = consumeAckLink(db, parsed.data, Date.now());
  if (!link.ok) throw new AppError(link.reason === "unknown" ? "not_found" : "conflict", refusal[link.reason]);
  const viewer = getViewerById(db, link.userId);
  if (!viewer) throw new AppError("not_found", refusal.unknown);
  const service = requireAlarmService();
  try {
    const result = service.command(viewer, link.alarmId, {
      type: "acknowledge",
      note: via === "push" ? "Acknowledged from the push notification" : "Acknowledged from the e-mailed link",
    });
    const alarm = getAlarm(db, viewer, link.alarmId);
    if (alarm)
      markAcknowledged(db, {
        alarmId: link.alarmId,
        activation: alarm.activations,
        userId: link.userId,
        path: via,
        atMs: Date.now(),
      });
    return Response.json(result);
  } catch (err) {
    // Someone acknowledged it in the app already: the link did its job.
    if (isAppError(err) && err.code === "conflict")
      return Response.json({ alarmId: link.alarmId, state: "already acknowledged" });
    throw err;
  }
});
