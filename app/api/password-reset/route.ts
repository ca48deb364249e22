import { CLIENT_ADDRESS_HEADER } from "@/lib/auth/session";
import { PASSWORD_RESET_ANSWER, passwordResetRequestSchema } from "@/lib/schemas/people";
import { readJson, route } from "@/lib/server/http";
import { requestPasswordReset } from "@/lib/server/people";
import { getDb } from "@/lib/server/runtime";

/** The same answer for every address, known or not: the response tells nothing about accounts. */
export const POST = route(async (request) => {
  const { email } = await readJson(request, passwordResetRequestSchema);
  await requestPasswordReset(getDb(), email, request.headers.get(CLIENT_ADDRESS_HEADER) ?? "unknown");
  return Response.json({ message: PASSWORD_RESET_ANSWER }, { status: 202 });
});
