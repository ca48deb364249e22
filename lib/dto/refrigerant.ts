import type { RefrigerantEntryKind, RefrigerantSummary } from "@/lib/refrigerant-log";

export interface RefrigerantEntryDto {
  id: number;
  at: number;
  kind: RefrigerantEntryKind;
  amountKg: number | null;
  cylinder: string | null;
  reason: string;
  result: string | null;
  correctsId: number | null;
  visitId: string | null;
  by: { id: string; name: string };
  recordedAt: number;
}

export interface RefrigerantLogDto {
  equipment: { id: string; siteId: string; tag: string; name: string; refrigerant: string | null };
  entries: RefrigerantEntryDto[];
  summary: RefrigerantSummary;
}
