import { AppError } from "@/lib/errors";
import { inboundSmsSchema } from "@/lib/schemas/notify";
import { route } from "@/lib/server/http";
import { acknowledgeBySms } from "@/lib/server/notify/use-cases";
import { getDb, requireAlarmService, requireNotifyPaths } from "@/lib/server/runtime";

// The SMS provider's webhook for inbound messages. No session: the provider's Ed25519 signature
// over the raw body is the credential (checked by its SDK), so a forged reply cannot acknowledge.
export const POST = route(async (request) => {
  const notify = requireNotifyPaths();
  const raw = await request.text();
  if (raw.length > 64 * 1024) throw new AppError("bad_request", "Too large.");
  const headers = Object.fromEntries(request.headers.entries());
  let event: unknown;
  try {
    event = await notify.sms.verifyWebhook(raw, headers);
  } catch {
    throw new AppError("unauthorized", "The webhook signature does not verify.");
  }
  const parsed = inboundSmsSchema.safeParse(event);
  // Other events (delivery reports) are acknowledged and ignored, so the provider does not retry them.
  if (!parsed.success || parsed.data.data.event_type !== "message.received") return Response.json({ ignored: true });
  const { from, text } = parsed.data.data.payload;
  const result = await acknowledgeBySms(
    getDb(),
    notify,
    requireAlarmService(),
    { from: from.phone_number, text },
    Date.now(),
  );
  return Response.json(result);
});
