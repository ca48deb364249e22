import type { PointListError, PointListPlan } from "@/lib/point-list-csv";
import type { PointDto } from "./sites";

/** One point with the equipment and site it belongs to and the gateway names that feed it. */
export interface PointDetailDto extends PointDto {
  equipmentId: string;
  equipmentTag: string;
  equipmentKind: string;
  siteId: string;
  label: string;
  measure: string;
  /** Gateway point names mapped onto this point (lib/point-map-csv.ts). */
  mappedBy: Array<{ gatewayId: string; gatewayPoint: string }>;
}

/** What a point-list upload did (or, as a preview, would do). */
export interface PointListResultDto {
  applied: boolean;
  plan: PointListPlan;
  errors: PointListError[];
}
