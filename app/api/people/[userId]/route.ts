import { requireApiViewer } from "@/app/(auth)/auth";
import { getPerson } from "@/db/queries/people";
import { notFound } from "@/lib/errors";
import { updatePersonSchema } from "@/lib/schemas/people";
import { requireAdmin } from "@/lib/server/guards";
import { readJson, route } from "@/lib/server/http";
import { updatePerson } from "@/lib/server/people";
import { getDb } from "@/lib/server/runtime";

type Context = { params: Promise<{ userId: string }> };

export const GET = route<Context>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  requireAdmin(viewer);
  const person = getPerson(getDb(), viewer, (await params).userId);
  if (!person) throw notFound("No such person.");
  return Response.json({ person });
});

/** Role, organization (customer users) and disabled; disabling ends the person's sessions at once. */
export const PATCH = route<Context>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  requireAdmin(viewer);
  const patch = await readJson(request, updatePersonSchema);
  return Response.json({ person: updatePerson(getDb(), viewer, (await params).userId, patch) });
});
