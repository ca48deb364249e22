import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb } from "@/lib/server/runtime";
import { listSiteFiles } from "@/db/queries/files";
import { canSeeSite } from "@/db/queries/sites";
import { notFound } from "@/lib/errors";
import { route } from "@/lib/server/http";
import { receiveUpload } from "@/lib/server/uploads";
import { fileListQuerySchema } from "@/lib/schemas/files";

type Context = { params: Promise<{ siteId: string }> };

export const GET = route<Context>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { siteId } = await params;
  const db = getDb();
  if (!canSeeSite(db, viewer, siteId)) throw notFound("No such site.");
  const query = fileListQuerySchema.parse(Object.fromEntries(new URL(request.url).searchParams));
  return Response.json({ files: listSiteFiles(db, viewer, siteId, query) });
});

/** multipart/form-data, not JSON: the body is read by receiveUpload, which counts its bytes as it reads. */
export const POST = route<Context>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { siteId } = await params;
  const db = getDb();
  if (!canSeeSite(db, viewer, siteId)) throw notFound("No such site.");
  const file = await receiveUpload(db, viewer, siteId, request);
  return Response.json({ file }, { status: 201 });
});
