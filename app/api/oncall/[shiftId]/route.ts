import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb } from "@/lib/server/runtime";
import { deleteShift } from "@/db/queries/oncall";
import { notFound } from "@/lib/errors";
import { route } from "@/lib/server/http";
import { requireAdmin } from "@/lib/server/guards";

export const DELETE = route<{ params: Promise<{ shiftId: string }> }>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  requireAdmin(viewer);
  if (!deleteShift(getDb(), (await params).shiftId)) throw notFound("No such shift.");
  return new Response(null, { status: 204 });
});
