import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb } from "@/lib/server/runtime";
import { createToken, listTokens } from "@/db/queries/tokens";
import { readJson, route } from "@/lib/server/http";
import { createTokenSchema } from "@/lib/schemas/tokens";
import { grantableTokenScope, scopeAllows } from "@/lib/auth/viewer";
import { AppError } from "@/lib/errors";

export const GET = route(async (request) => {
  const viewer = await requireApiViewer(request);
  return Response.json({ tokens: listTokens(getDb(), viewer) });
});

export const POST = route(async (request) => {
  const viewer = await requireApiViewer(request);
  const { name, expiresInDays, scope } = await readJson(request, createTokenSchema);
  const grantable = grantableTokenScope(viewer);
  if (scope && !scopeAllows(grantable, scope))
    throw new AppError("forbidden", `You can create tokens with at most the ${grantable} scope.`);
  const expiresAt = expiresInDays === undefined ? null : new Date(Date.now() + expiresInDays * 86_400_000);
  const { token, apiToken } = createToken(getDb(), viewer, name, expiresAt, scope ?? grantable);
  return Response.json({ token, apiToken }, { status: 201 });
});
