import { requireApiViewer } from "@/app/(auth)/auth";
import { requireAdmin } from "@/lib/server/guards";
import { route } from "@/lib/server/http";
import { resendInvitation } from "@/lib/server/people";
import { getDb } from "@/lib/server/runtime";

/** A fresh invitation e-mail; the links sent before stop working. */
export const POST = route<{ params: Promise<{ userId: string }> }>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  requireAdmin(viewer);
  return Response.json({ person: await resendInvitation(getDb(), viewer, (await params).userId) });
});
