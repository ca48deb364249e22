import type { auditEntityTypes } from "@/lib/schemas/audit";

export type AuditEntityTypeDto = (typeof auditEntityTypes)[number];

export interface AuditEntryDto {
  id: number;
  /** Epoch milliseconds. */
  at: number;
  actorId: string | null;
  actorName: string;
  action: string;
  entityType: AuditEntityTypeDto;
  entityId: string;
  siteId: string | null;
  summary: string;
  before: unknown;
  after: unknown;
}
