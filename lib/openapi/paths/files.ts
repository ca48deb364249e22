import { fileListQuerySchema, fileUpdateSchema, uploadBodySchema } from "@/lib/schemas/files";
import { refrigerantEntrySchema } from "@/lib/schemas/refrigerant";
import type { Operation } from "../operation";

// The service call's records: photos and files, and each chiller's refrigerant log.

export const fileOperations: Operation[] = [
  {
    method: "get",
    path: "/api/sites/{siteId}/files",
    tag: "Files",
    summary: "A site's photos and files",
    description: "A customer sees only the files shared with it.",
    access: "signed-in",
    query: fileListQuerySchema,
    responses: { 200: "The files, oldest first" },
  },
  {
    method: "post",
    path: "/api/sites/{siteId}/files",
    tag: "Files",
    summary: "Upload a photo or PDF",
    description:
      "The type is found in the content, not the name: JPEG, PNG, WebP, HEIC (stored as JPEG) and PDF only. At most 15 MB, refused with 413 as soon as the body passes it. Photos are re-encoded without EXIF (no location) and get a 320 px thumbnail. Staff upload to any site; a customer only with a service request of its own site.",
    access: "signed-in",
    body: uploadBodySchema,
    bodyType: "multipart/form-data",
    responses: { 201: "Stored" },
  },
  {
    method: "get",
    path: "/api/files/{fileId}",
    tag: "Files",
    summary: "A file's content, with the stored type",
    description: "404 for a customer unless the file is shared and on its own organization's site.",
    access: "signed-in",
    responses: { 200: "The bytes" },
    responseType: "application/octet-stream",
  },
  {
    method: "patch",
    path: "/api/files/{fileId}",
    tag: "Files",
    summary: "Change a file's caption or share it with the customer",
    access: "staff",
    body: fileUpdateSchema,
    responses: { 200: "The file after the change (audited)" },
  },
  {
    method: "get",
    path: "/api/files/{fileId}/thumbnail",
    tag: "Files",
    summary: "A photo's 320 px WebP thumbnail",
    access: "signed-in",
    responses: { 200: "The thumbnail" },
    responseType: "image/webp",
  },
  {
    method: "get",
    path: "/api/equipment/{equipmentId}/refrigerant",
    tag: "Refrigerant",
    summary: "A chiller's refrigerant log with its totals and annual leak rate",
    description:
      "Leak rate by the annualizing method of 40 CFR §82.152/§82.157 (US EPA), with the rolling average method beside it; see lib/refrigerant-log.ts.",
    access: "signed-in",
    responses: { 200: "Entries, corrections applied, and the figures" },
  },
  {
    method: "post",
    path: "/api/equipment/{equipmentId}/refrigerant",
    tag: "Refrigerant",
    summary: "Append an entry: added, recovered, full charge, leak check or correction",
    description:
      "The log is append-only: a mistake is corrected by a new entry naming it (`correctsId`) with a signed amount.",
    access: "staff",
    body: refrigerantEntrySchema,
    responses: { 201: "The new entry" },
  },
];
