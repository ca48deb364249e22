import { requireApiViewer } from "@/app/(auth)/auth";
import { listOrganizationOptions, listPeople } from "@/db/queries/people";
import { inviteSchema } from "@/lib/schemas/people";
import { requireAdmin } from "@/lib/server/guards";
import { readJson, route } from "@/lib/server/http";
import { invitePerson } from "@/lib/server/people";
import { getDb } from "@/lib/server/runtime";

export const GET = route(async (request) => {
  const viewer = await requireApiViewer(request);
  requireAdmin(viewer);
  const db = getDb();
  return Response.json({ people: listPeople(db, viewer), organizations: listOrganizationOptions(db, viewer) });
});

/** Invites a person: the account exists at once, with no password until they follow the e-mailed link. */
export const POST = route(async (request) => {
  const viewer = await requireApiViewer(request);
  requireAdmin(viewer);
  const input = await readJson(request, inviteSchema);
  return Response.json({ person: await invitePerson(getDb(), viewer, input) }, { status: 201 });
});
