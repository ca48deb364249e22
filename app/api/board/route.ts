import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb } from "@/lib/server/runtime";
import { route } from "@/lib/server/http";
import { readBoard } from "@/lib/server/board/board";

/** The board: every plant the caller may see with its status, changes in place, open requests and visits. */
export const GET = route(async (request) => {
  const viewer = await requireApiViewer(request);
  return Response.json({ sites: readBoard(getDb(), viewer) });
});
