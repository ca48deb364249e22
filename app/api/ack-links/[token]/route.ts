import { z } from "zod";
import { getDb } from "@/lib/server/runtime";
import { consumeAckLink } from "@/db/queries/oncall";
import { getViewerById } from "@/db/queries/users";
import { AppError, isAppError } from "@/lib/errors";
import { ackLinkRefusal as refusal, ACK_TOKEN_PATTERN } from "@/lib/oncall/ack-link";
import { route } from "@/lib/server/http";
import { requireAlarmService } from "@/lib/server/runtime";

const tokenSchema = z.string().regex(ACK_TOKEN_PATTERN);

// The e-mailed link is the credential: it names one alarm and one person, works once, and
// expires. GET never acts (mail scanners prefetch links); the page POSTs here.
export const POST = route<{ params: Promise<{ token: string }> }>(async (_request, { params }) => {
  const parsed = tokenSchema.safeParse((await params).token);
  if (!parsed.success) throw new AppError("not_found", refusal.unknown);
  const db = getDb();
  const link = consumeAckLink(db, parsed.data, Date.now());
  if (!link.ok) throw new AppError(link.reason === "unknown" ? "not_found" : "conflict", refusal[link.reason]);
  const viewer = getViewerById(db, link.userId);
  if (!viewer) throw new AppError("not_found", refusal.unknown);
  try {
    return Response.json(
      requireAlarmService().command(viewer, link.alarmId, {
        type: "acknowledge",
        note: "Acknowledged from the e-mailed link",
      }),
    );
  } catch (err) {
    // Someone acknowledged it in the app already: the link did its job.
    if (isAppError(err) && err.code === "conflict")
      return Response.json({ alarmId: link.alarmId, state: "already acknowledged" });
    throw err;
  }
});
