import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb } from "@/lib/server/runtime";
import { getStoredFile } from "@/db/queries/files";
import { notFound } from "@/lib/errors";
import { route } from "@/lib/server/http";
import { fileResponse } from "@/lib/server/file-response";

export const GET = route<{ params: Promise<{ fileId: string }> }>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const file = getStoredFile(getDb(), viewer, (await params).fileId);
  if (!file?.thumbnailKey) throw notFound("No such thumbnail.");
  return fileResponse(file, file.thumbnailKey, "image/webp");
});
