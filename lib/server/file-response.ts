import type { StoredFileDto } from "@/lib/dto/files";
import { notFound } from "@/lib/errors";
import { inlineDisposition } from "@/lib/file-names";
import { fileStorage } from "./file-storage";

/**
 * A stored file's bytes with the type found at upload, never sniffed by the browser, kept in the
 * browser's private cache only (sharing can be withdrawn, so not for long).
 */
export async function fileResponse(file: StoredFileDto, key: string, mediaType: string): Promise<Response> {
  const bytes = await fileStorage().get(key);
  if (!bytes) throw notFound("The file's content is missing.");
  return new Response(new Uint8Array(bytes), {
    headers: {
      "content-type": mediaType,
      "content-length": String(bytes.byteLength),
      "content-disposition": inlineDisposition(file.originalName, mediaType),
      "x-content-type-options": "nosniff",
      "cache-control": "private, max-age=300",
      "cross-origin-resource-policy": "same-origin",
    },
  });
}
