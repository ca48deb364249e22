import { randomUUID } from "node:crypto";
import { fileTypeFromBuffer } from "file-type";
import sharp from "sharp";
import type { Db } from "@/db/client";
import { checkUploadLinks, insertStoredFile } from "@/db/queries/files";
import { canAct, type Viewer } from "@/lib/auth/viewer";
import type { StoredFileDto } from "@/lib/dto/files";
import { AppError } from "@/lib/errors";
import { cleanOriginalName } from "@/lib/file-names";
import { allowedUploadTypes, MAX_UPLOAD_BYTES, uploadFieldsSchema, type AllowedUploadType } from "@/lib/schemas/files";
import { fileStorage, newStorageKey, type FileStorage } from "./file-storage";

// An upload from a phone: read the body while counting its bytes (refused the moment it passes
// the limit, never buffered whole first), find the type in the content, re-encode photos so their
// EXIF (the location above all) is gone, make a thumbnail, store the bytes, then the row.

/** Room for the form's text fields and the multipart boundaries beside the file itself. */
const FORM_OVERHEAD_BYTES = 64 * 1024;
const THUMBNAIL_WIDTH_PX = 320;
/** 100 megapixels: beyond any phone camera, short of a decompression bomb's size. */
const MAX_INPUT_PIXELS = 100_000_000;

const tooLarge = () =>
  new AppError(
    "payload_too_large",
    `The file is larger than ${MAX_UPLOAD_BYTES / (1024 * 1024)} MB. Send a smaller photo or PDF (a phone photo at normal size fits).`,
  );

/** Reads a request body, refusing it as soon as it is longer than `maxBytes` (declared or counted). */
export async function readBodyLimited(request: Request, maxBytes: number): Promise<Buffer> {
  const declared = Number(request.headers.get("content-length") ?? NaN);
  if (Number.isFinite(declared) && declared > maxBytes) throw tooLarge();
  if (!request.body) throw new AppError("bad_request", "Send the file as multipart/form-data.");
  const reader = request.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > maxBytes) {
      await reader.cancel().catch(() => undefined);
      throw tooLarge();
    }
    chunks.push(value);
  }
  return Buffer.concat(chunks, total);
}

interface Processed {
  bytes: Buffer;
  mediaType: string;
  thumbnail: Buffer | null;
}

const typeNames: Record<AllowedUploadType, string> = {
  "image/jpeg": "JPEG",
  "image/png": "PNG",
  "image/webp": "WebP",
  "image/heic": "HEIC",
  "application/pdf": "PDF",
};

/** The type from the content (magic numbers), refusing anything but photos and PDF. */
export async function detectUploadType(bytes: Uint8Array): Promise<AllowedUploadType> {
  const found = await fileTypeFromBuffer(bytes);
  const mime = found?.mime === "image/heif" ? "image/heic" : found?.mime;
  if (!mime || !(allowedUploadTypes as readonly string[]).includes(mime))
    throw new AppError(
      "unsupported_media_type",
      `Only photos (JPEG, PNG, WebP, HEIC) and PDF files can be uploaded; this file is ${found ? `${found.ext.toUpperCase()} (${found.mime})` : "of a type that is not recognized"}.`,
    );
  return mime as AllowedUploadType;
}

/**
 * Re-encodes a photo: `.rotate()` applies the EXIF orientation to the pixels, and sharp writes no
 * metadata unless asked (no `.withMetadata()`/`.keepExif()`), so GPS position, camera serial and
 * the rest of EXIF/XMP/IPTC are gone from what is stored.
 */
async function processImage(bytes: Uint8Array, type: AllowedUploadType): Promise<Processed> {
  const input = () => sharp(bytes, { limitInputPixels: MAX_INPUT_PIXELS, failOn: "error" }).rotate();
  let out: Buffer;
  let mediaType: string = type;
  try {
    if (type === "image/png") out = await input().png().toBuffer();
    else if (type === "image/webp") out = await input().webp({ quality: 90 }).toBuffer();
    else {
      // HEIC is kept as JPEG: browsers other than one family cannot show HEIC.
      out = await input().jpeg({ quality: 90 }).toBuffer();
      mediaType = "image/jpeg";
    }
  } catch {
    throw new AppError(
      "unsupported_media_type",
      type === "image/heic"
        ? "This HEIC photo cannot be read here. Set the phone's camera to save JPEG, or send the photo as JPEG."
        : `This ${typeNames[type]} image is damaged or too large to read.`,
    );
  }
  const thumbnail = await sharp(out)
    .resize({ width: THUMBNAIL_WIDTH_PX, withoutEnlargement: true })
    .webp({ quality: 70 })
    .toBuffer();
  return { bytes: out, mediaType, thumbnail };
}

/**
 * Stores an upload for a site the viewer may see (the route checks that first) and records it.
 * Nothing is stored when anything is refused; bytes written before a failed insert are removed.
 */
export async function receiveUpload(
  db: Db,
  viewer: Viewer,
  siteId: string,
  request: Request,
  storage: FileStorage = fileStorage(),
): Promise<StoredFileDto> {
  const mediaType = request.headers.get("content-type")?.split(";")[0].trim().toLowerCase();
  if (mediaType !== "multipart/form-data")
    throw new AppError("unsupported_media_type", "Send the file as multipart/form-data.");
  const body = await readBodyLimited(request, MAX_UPLOAD_BYTES + FORM_OVERHEAD_BYTES);
  let form: FormData;
  try {
    form = await new Response(new Uint8Array(body), {
      headers: { "content-type": request.headers.get("content-type")! },
    }).formData();
  } catch {
    throw new AppError("bad_request", "The form could not be read; send it as multipart/form-data.");
  }
  const file = form.get("file");
  if (!(file instanceof Blob)) throw new AppError("bad_request", "Attach the photo or PDF as the `file` field.");
  if (file.size > MAX_UPLOAD_BYTES) throw tooLarge();
  if (file.size === 0) throw new AppError("bad_request", "The file is empty.");
  const text = (name: string) => {
    const v = form.get(name);
    return typeof v === "string" && v !== "" ? v : undefined;
  };
  const fields = uploadFieldsSchema.parse({
    caption: text("caption"),
    visitId: text("visitId"),
    serviceRequestId: text("serviceRequestId"),
    shared: text("shared"),
  });
  checkUploadLinks(db, viewer, siteId, fields);

  const bytes = new Uint8Array(await file.arrayBuffer());
  const type = await detectUploadType(bytes);
  const processed: Processed =
    type === "application/pdf"
      ? { bytes: Buffer.from(bytes), mediaType: type, thumbnail: null }
      : await processImage(bytes, type);

  const storageKey = newStorageKey();
  const thumbnailKey = processed.thumbnail ? newStorageKey() : null;
  try {
    await storage.put(storageKey, processed.bytes);
    if (thumbnailKey && processed.thumbnail) await storage.put(thumbnailKey, processed.thumbnail);
    return insertStoredFile(db, viewer, {
      id: randomUUID(),
      siteId,
      visitId: fields.visitId ?? null,
      serviceRequestId: fields.serviceRequestId ?? null,
      mediaType: processed.mediaType,
      bytes: processed.bytes.byteLength,
      storageKey,
      thumbnailKey,
      originalName: cleanOriginalName(file instanceof File ? file.name : "upload"),
      caption: fields.caption ?? "",
      // A customer's own photo on its own request is theirs to see; staff choose.
      sharedWithCustomer: canAct(viewer) ? fields.shared : true,
    });
  } catch (err) {
    await storage.delete(storageKey).catch(() => undefined);
    if (thumbnailKey) await storage.delete(thumbnailKey).catch(() => undefined);
    throw err;
  }
}
