import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb } from "@/lib/server/runtime";
import { createToken, listTokens } from "@/db/queries/tokens";
import { readJson, route } from "@/lib/server/http";
import { createTokenSchema } from "@/lib/schemas/tokens";

export const GET = route(async (request) => {
  const viewer = await requireApiViewer(request);
  return Response.json({ tokens: listTokens(getDb(), viewer) });
});

export const POST = route(async (request) => {
  const viewer = await requireApiViewer(request);
  const { name } = await readJson(request, createTokenSchema);
  const { token, apiToken } = createToken(getDb(), viewer, name);
  return Response.json({ token, apiToken }, { status: 201 });
});
