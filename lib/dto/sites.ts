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
  points: PointDto[];
}

export interface SiteDetailDto extends SiteSummaryDto {
  equipment: EquipmentDto[];
}
