import type { z } from "zod";

// One entry per route handler method. The request shapes are the same zod schemas the handlers
// parse with, so the document cannot drift from what the server accepts.

export type Access =
  /** No sign-in: health checks and the public link pages. */
  | "public"
  /** Any signed-in person or API token (customers see only their own organization's records). */
  | "signed-in"
  /** Service-company staff: technicians and administrators. */
  | "staff"
  | "admin";

export interface Operation {
  method: "get" | "post" | "put" | "patch" | "delete";
  /** OpenAPI path template: `/api/sites/{siteId}`. Path parameters are strings unless `params` says otherwise. */
  path: string;
  tag: string;
  summary: string;
  description?: string;
  access: Access;
  params?: z.ZodObject;
  query?: z.ZodObject;
  body?: z.ZodType;
  /** Media type of the body; JSON unless said. */
  bodyType?: "application/json" | "text/csv" | "multipart/form-data";
  /** Success responses by status; the error responses are added from `access`. */
  responses: Record<number, string>;
  /** Success media type when not JSON (exports, CSV). */
  responseType?: string;
}
