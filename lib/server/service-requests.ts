import { createServiceRequest } from "@/db/queries/service-requests";
import type { Viewer } from "@/lib/auth/viewer";
import type { ServiceRequestDto } from "@/lib/dto/service";
import type { CreateServiceRequestInput } from "@/lib/schemas/service";
import { onCallContacts } from "./oncall-contacts";
import type { ServiceContext } from "./visits";

// A customer's request for service: stored, then the on-call technician hears of it by e-mail
// through the same mail path and rota the alarms use.

const urgencyWords = { not_urgent: "not urgent", today: "today", now: "now" } as const;

export async function requestService(
  ctx: ServiceContext,
  viewer: Viewer,
  input: CreateServiceRequestInput,
  deps: {
    sendMail?: (message: { to: string; subject: string; text: string }) => Promise<void>;
    publicUrl: string;
    log?: (line: string) => void;
  },
): Promise<ServiceRequestDto> {
  const request = createServiceRequest(ctx.db, viewer, input, ctx.nowMs);
  if (!deps.sendMail) return request;
  for (const person of onCallContacts(ctx.db, ctx.nowMs, 0)) {
    const text = [
      `${request.siteName}: ${viewer.name} asks for service (${urgencyWords[input.urgency]}).`,
      "",
      input.description,
      "",
      `Call back: ${input.callbackPhone}`,
      `Take it: ${deps.publicUrl}/?request=${request.id}`,
      "",
      `You are receiving this as ${person.why}.`,
    ].join("\n");
    try {
      await deps.sendMail({
        to: person.email,
        subject: `[Liftline service request, ${urgencyWords[input.urgency]}] ${request.siteName}`.slice(0, 180),
        text,
      });
    } catch (err) {
      // The request is on record and on the board either way; the mail failure is for the log.
      deps.log?.(`[service] could not e-mail ${person.email}: ${err instanceof Error ? err.message : err}`);
    }
  }
  return request;
}
