import type { Measure } from "@/lib/quantities";

export interface SiteSummaryDto {
  id: string;
  name: string;
  kind: string;
  address: string;
  timeZone: string;
  customer: { id: string; name: string };
  equipmentCount: number;
}

export interface PointDto {
  id: number;
  key: string;
  quantity: string;
  unit: string;
  brickClass: string;
  expectedIntervalS: number;
  lowLimit: number | null;
  highLimit: number | null;
}

export interface EquipmentDto {
  id: string;
  tag: string;
  name: string;
  kind: string;
  capacityTons: number | null;
  designFlowLps: number | null;
  refrigerant: string | null;
  serves: string | null;
  /** Pumps: the loop their record names. */
  loop?: "chilled_water" | "condenser_water" | null;
  points: PointDto[];
}

export interface SiteDetailDto extends SiteSummaryDto {
  equipment: EquipmentDto[];
  contacts: SiteContactDto[];
  accessNotes: string;
  /** Set when the site is retired: its history stays readable, it is off the board and its rules stop. */
  retiredAtMs: number | null;
}

/** When and by whom a record was retired; null while it is in service. */
export interface RetiredDto {
  retiredAtMs: number | null;
  retiredBy: string | null;
}

export interface CustomerDto extends RetiredDto {
  id: string;
  name: string;
  createdAtMs: number;
  /** Sites in service. */
  siteCount: number;
}

export interface SiteContactDto {
  name: string;
  role: string;
  phone: string;
  email: string;
}

/** A site's whole record, as its edit form reads it. */
export interface SiteRecordDto extends SiteSummaryDto, RetiredDto {
  contacts: SiteContactDto[];
  accessNotes: string;
  createdAtMs: number;
}

/** A limit as the chiller's page shows it: the value, whether it is a default, why, and who entered it. */
export interface ChillerLimitDto {
  key: string;
  value: number;
  source: "default" | "entered";
  basis: string;
  setBy?: string | null;
  setByName?: string | null;
  setAtMs?: number;
}

/** One piece of equipment's whole record: the fields of its kind (lib/schemas/equipment.ts) and, for a chiller, its limits. */
export interface EquipmentRecordDto extends RetiredDto {
  id: string;
  siteId: string;
  kind: string;
  tag: string;
  name: string;
  serves: string | null;
  /** The kind's fields as the equipment form takes them (capacityTons, refrigerant, compressorType, loop, …). */
  record: Record<string, unknown>;
  createdAtMs: number;
  limits: Record<string, ChillerLimitDto> | null;
}

/**
 * One piece of equipment's points as the site page lists them: label and measure resolved on the
 * server, and the technical identifiers (point key, Brick class) only for staff — a customer's page
 * never carries them.
 */
export interface EquipmentPointsView {
  id: string;
  tag: string;
  name: string;
  kind: string;
  capacityTons: number | null;
  refrigerant: string | null;
  serves: string | null;
  points: Array<{
    id: number;
    label: string;
    measure: Measure;
    expectedIntervalS: number;
    identifiers?: { key: string; brickClass: string };
  }>;
}
