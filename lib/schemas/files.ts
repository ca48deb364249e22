import { z } from "zod";
import { safeText } from "./text";

// Uploads are multipart/form-data: the file's bytes are checked by the server (type from the
// content, size while reading); the text fields beside it are validated here.

/** The largest upload, in bytes: a phone photo at full resolution fits with room to spare. */
export const MAX_UPLOAD_BYTES = 15 * 1024 * 1024;

/** What may be uploaded, by the type found in the content: photos and PDF documents. */
export const allowedUploadTypes = ["image/jpeg", "image/png", "image/webp", "image/heic", "application/pdf"] as const;
export type AllowedUploadType = (typeof allowedUploadTypes)[number];

const caption = safeText(z.string().trim().max(500, "At most 500 characters"));
const recordId = z.string().trim().min(1).max(100);

/** The form fields sent with an upload (all text, as a form sends them). */
export const uploadFieldsSchema = z.object({
  caption: caption.optional(),
  visitId: recordId.optional(),
  serviceRequestId: recordId.optional(),
  /** Staff only: share the file with the customer at once. A checkbox sends "on". */
  shared: z
    .enum(["true", "false", "on", "1", "0"])
    .optional()
    .transform((v) => v === "true" || v === "on" || v === "1"),
});
export type UploadFields = z.infer<typeof uploadFieldsSchema>;

/** The multipart body as the API document describes it. */
export const uploadBodySchema = z.object({
  file: z.string().meta({ format: "binary", description: "JPEG, PNG, WebP, HEIC or PDF, at most 15 MB" }),
  caption: z.string().max(500).optional(),
  visitId: z.string().optional(),
  serviceRequestId: z.string().optional().meta({ description: "Required for customers: their own service request" }),
  shared: z.enum(["true", "false"]).optional().meta({ description: "Staff only: share with the customer" }),
});

export const fileUpdateSchema = z
  .object({
    caption: caption.optional(),
    sharedWithCustomer: z.boolean().optional(),
  })
  .refine((v) => v.caption !== undefined || v.sharedWithCustomer !== undefined, {
    message: "Change the caption or the sharing",
  });
export type FileUpdateInput = z.infer<typeof fileUpdateSchema>;

export const fileListQuerySchema = z.object({
  visitId: recordId.optional(),
  serviceRequestId: recordId.optional(),
});
