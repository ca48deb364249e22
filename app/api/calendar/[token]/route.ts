import { calendarFeedOwner, shiftsOf } from "@/db/queries/notify";
import { notFound } from "@/lib/errors";
import { calendarTokenSchema } from "@/lib/schemas/notify";
import { route } from "@/lib/server/http";
import { onCallCalendar } from "@/lib/server/notify/calendar";
import { getDb } from "@/lib/server/runtime";

// A calendar app fetches this without a session: the private URL is the credential. Unknown,
// revoked or malformed tokens all answer the same 404.
export const GET = route<{ params: Promise<{ token: string }> }>(async (_request, { params }) => {
  const parsed = calendarTokenSchema.safeParse((await params).token);
  if (!parsed.success) throw notFound("No such calendar.");
  const db = getDb();
  const owner = calendarFeedOwner(db, parsed.data);
  if (!owner) throw notFound("No such calendar.");
  const body = onCallCalendar(owner.name, shiftsOf(db, owner.userId), process.env.NEXTAUTH_URL ?? "");
  return new Response(body, {
    headers: {
      "content-type": "text/calendar; charset=utf-8",
      "cache-control": "private, no-store",
    },
  });
});
