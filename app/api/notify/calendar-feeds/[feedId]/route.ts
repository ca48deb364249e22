import { requireApiViewer } from "@/app/(auth)/auth";
import { revokeCalendarFeed } from "@/db/queries/notify";
import { route } from "@/lib/server/http";
import { getDb } from "@/lib/server/runtime";

export const DELETE = route<{ params: Promise<{ feedId: string }> }>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  revokeCalendarFeed(getDb(), viewer, (await params).feedId, Date.now());
  return new Response(null, { status: 204 });
});
