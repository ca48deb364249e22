import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb } from "@/lib/server/runtime";
import { getStoredFile, updateStoredFile } from "@/db/queries/files";
import { canAct } from "@/lib/auth/viewer";
import { AppError, notFound } from "@/lib/errors";
import { readJson, route } from "@/lib/server/http";
import { fileResponse } from "@/lib/server/file-response";
import { fileUpdateSchema } from "@/lib/schemas/files";

type Context = { params: Promise<{ fileId: string }> };

export const GET = route<Context>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const file = getStoredFile(getDb(), viewer, (await params).fileId);
  if (!file) throw notFound("No such file.");
  return fileResponse(file, file.storageKey, file.mediaType);
});

export const PATCH = route<Context>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const db = getDb();
  const { fileId } = await params;
  if (!getStoredFile(db, viewer, fileId)) throw notFound("No such file.");
  if (!canAct(viewer)) throw new AppError("forbidden", "Only the service company's staff can change a file.");
  const patch = await readJson(request, fileUpdateSchema);
  const file = updateStoredFile(db, viewer, fileId, patch);
  if (!file) throw notFound("No such file.");
  return Response.json({ file });
});
