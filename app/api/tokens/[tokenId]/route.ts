import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb } from "@/lib/server/runtime";
import { revokeToken } from "@/db/queries/tokens";
import { notFound } from "@/lib/errors";
import { route } from "@/lib/server/http";

export const DELETE = route<{ params: Promise<{ tokenId: string }> }>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { tokenId } = await params;
  if (!revokeToken(getDb(), viewer, tokenId)) throw notFound("No such active token.");
  return new Response(null, { status: 204 });
});
