import { requireApiViewer } from "@/app/(auth)/auth";
import { getAccount } from "@/db/queries/people";
import { notFound } from "@/lib/errors";
import { accountSchema } from "@/lib/schemas/people";
import { readJson, route } from "@/lib/server/http";
import { saveOwnAccount } from "@/lib/server/people";
import { getDb } from "@/lib/server/runtime";

export const GET = route(async (request) => {
  const viewer = await requireApiViewer(request);
  const account = getAccount(getDb(), viewer);
  if (!account) throw notFound("No such account.");
  return Response.json({ account });
});

/** A person's own name, phone number and unit system. */
export const PATCH = route(async (request) => {
  const viewer = await requireApiViewer(request);
  const input = await readJson(request, accountSchema);
  return Response.json({ account: saveOwnAccount(getDb(), viewer, input) });
});
