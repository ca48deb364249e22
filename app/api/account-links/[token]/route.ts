import { AppError } from "@/lib/errors";
import { ACCOUNT_LINK_TOKEN_PATTERN, accountLinkRefusal, setPasswordSchema } from "@/lib/schemas/people";
import { accountLinkStatus } from "@/lib/server/account-links";
import { readJson, route } from "@/lib/server/http";
import { setPasswordWithLink } from "@/lib/server/people";
import { getDb } from "@/lib/server/runtime";

// The e-mailed link is the credential: it names one person, works once and expires. GET only
// says whether it is valid (mail scanners prefetch links); the page POSTs the new password.
type Context = { params: Promise<{ token: string }> };

export const GET = route<Context>(async (_request, { params }) => {
  return Response.json(accountLinkStatus(getDb(), (await params).token));
});

export const POST = route<Context>(async (request, { params }) => {
  const { token } = await params;
  if (!ACCOUNT_LINK_TOKEN_PATTERN.test(token)) throw new AppError("not_found", accountLinkRefusal.unknown);
  const { password } = await readJson(request, setPasswordSchema);
  const result = await setPasswordWithLink(getDb(), token, password);
  return Response.json({ ...result, next: "/sign-in" });
});
