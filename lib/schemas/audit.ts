import { z } from "zod";

/** The same list as db/schema/records.ts's, which lib/ may not import. */
export const auditEntityTypes = [
  "customer",
  "site",
  "equipment",
  "limit",
  "point",
  "person",
  "gateway",
  "token",
  "rule_settings",
] as const;

const instant = z.union([z.coerce.number().int().min(0), z.iso.datetime({ offset: true }).transform(Date.parse)]);

/** GET /api/audit's query: every filter optional; `before` pages to older entries by id. */
export const auditQuerySchema = z
  .object({
    entityType: z.enum(auditEntityTypes).optional(),
    entityId: z.string().min(1).max(200).optional(),
    siteId: z.string().min(1).max(100).optional(),
    actorId: z.string().min(1).max(100).optional(),
    from: instant.optional(),
    to: instant.optional(),
    before: z.coerce.number().int().min(1).optional(),
    limit: z.coerce.number().int().min(1).max(200).default(50),
  })
  .refine((q) => q.from === undefined || q.to === undefined || q.from < q.to, {
    message: "from must be before to",
    path: ["from"],
  });
export type AuditQuery = z.infer<typeof auditQuerySchema>;
