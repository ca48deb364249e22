import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb } from "@/lib/server/runtime";
import { createShift, listShifts, onCallCandidates } from "@/db/queries/oncall";
import { AppError } from "@/lib/errors";
import { readJson, route } from "@/lib/server/http";
import { requireAdmin, requireStaff } from "@/lib/server/guards";
import { shiftSchema } from "@/lib/schemas/oncall";

export const GET = route(async (request) => {
  const viewer = await requireApiViewer(request);
  requireStaff(viewer);
  const db = getDb();
  return Response.json({ shifts: listShifts(db, Date.now() - 24 * 3600_000), people: onCallCandidates(db) });
});

export const POST = route(async (request) => {
  const viewer = await requireApiViewer(request);
  requireAdmin(viewer);
  const input = await readJson(request, shiftSchema);
  const db = getDb();
  const staff = new Set(onCallCandidates(db).map((p) => p.id));
  if (!staff.has(input.primaryUserId) || (input.backupUserId && !staff.has(input.backupUserId))) {
    throw new AppError("bad_request", "On-call people must be admins or technicians.");
  }
  const shift = createShift(db, {
    startsAt: Date.parse(input.startsAt),
    endsAt: Date.parse(input.endsAt),
    primaryUserId: input.primaryUserId,
    backupUserId: input.backupUserId,
  });
  return Response.json({ shift }, { status: 201 });
});
