import { serviceRequestMailSubscribers } from "@/db/queries/notify";
import { createServiceRequest, getServiceRequest, updateServiceRequest } from "@/db/queries/service-requests";
import type { Viewer } from "@/lib/auth/viewer";
import type { ServiceRequestDto } from "@/lib/dto/service";
import type { CreateServiceRequestInput, UpdateServiceRequestInput } from "@/lib/schemas/service";
import { onCallContacts } from "./oncall-contacts";
import type { ServiceContext } from "./visits";

// A customer's request for service: stored, then the on-call technician hears of it by e-mail
// through the same mail path and rota the alarms use; as it moves on, the customers who chose
// to hear are told in the same plain words their site page shows.

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

/** Moves a request on (assign, on the way, done, cancel) and tells the customers who chose to hear. */
export function moveServiceRequest(
  ctx: ServiceContext,
  viewer: Viewer,
  requestId: string,
  input: UpdateServiceRequestInput,
): ServiceRequestDto {
  const before = getServiceRequest(ctx.db, viewer, requestId);
  const after = updateServiceRequest(ctx.db, viewer, requestId, input, ctx.nowMs);
  if (before && before.state !== after.state) tellCustomersRequestMoved(ctx, after);
  return after;
}

/** E-mails the site's opted-in customer users the request's new state; a failure is only logged. */
export function tellCustomersRequestMoved(ctx: ServiceContext, request: ServiceRequestDto): void {
  const sendMail = ctx.sendMail;
  if (!sendMail) return;
  for (const person of serviceRequestMailSubscribers(ctx.db, request.siteId)) {
    const text = [
      `Hello ${person.name},`,
      "",
      `Your service request at ${request.siteName}: ${request.stateText}`,
      "",
      `You asked: ${request.description.slice(0, 300)}`,
      ctx.publicUrl ? `See it in Liftline: ${ctx.publicUrl}/sites/${request.siteId}` : "",
      "",
      "You receive this because you chose it in your Liftline settings; turn it off there.",
    ].join("\n");
    sendMail({ to: person.email, subject: `${request.siteName}: your service request`, text }).catch((err: unknown) =>
      ctx.log?.(`[service] could not e-mail ${person.email}: ${String(err)}`),
    );
  }
}
