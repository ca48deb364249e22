import { requireApiViewer } from "@/app/(auth)/auth";
import { AppError } from "@/lib/errors";
import { changePasswordSchema } from "@/lib/schemas/people";
import { readJson, route } from "@/lib/server/http";
import { changeOwnPassword } from "@/lib/server/people";
import { getDb } from "@/lib/server/runtime";

/** The current password and a new one; the person's other sessions end. */
export const POST = route(async (request) => {
  const viewer = await requireApiViewer(request);
  // A leaked token must not be able to take the account over.
  if (viewer.tokenScope) throw new AppError("forbidden", "Change your password signed in, not with an API token.");
  const { currentPassword, newPassword } = await readJson(request, changePasswordSchema);
  await changeOwnPassword(getDb(), viewer, currentPassword, newPassword);
  return new Response(null, { status: 204 });
});
