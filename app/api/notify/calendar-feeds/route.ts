import { requireApiViewer } from "@/app/(auth)/auth";
import { createCalendarFeed, listCalendarFeeds } from "@/db/queries/notify";
import { route } from "@/lib/server/http";
import { getDb } from "@/lib/server/runtime";

export const GET = route(async (request) => {
  const viewer = await requireApiViewer(request);
  return Response.json({ feeds: listCalendarFeeds(getDb(), viewer) });
});

// The URL is shown once: only the token's hash is kept, like an API token.
export const POST = route(async (request) => {
  const viewer = await requireApiViewer(request);
  const { feed, token } = createCalendarFeed(getDb(), viewer);
  const base = process.env.NEXTAUTH_URL ?? new URL(request.url).origin;
  return Response.json({ feed, url: `${base}/api/calendar/${token}` }, { status: 201 });
});
