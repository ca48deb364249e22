import type { Quality } from "@/lib/quality";
import type { Measure } from "@/lib/quantities";
import type { SiteStatus } from "@/lib/realtime/events";

export interface SeriesDto {
  pointId: number;
  quantity: string;
  measure: Measure;
  /** The unit `min`/`max`/`avg` are in (the viewer's IP or SI preference), rounded to 0.001 of it. */
  unit: string;
  unitSystem: "ip" | "si";
  from: string;
  to: string;
  source: "raw" | "rollup_1m" | "rollup_1h";
  /** Bucket width; null when every raw reading is returned as is. */
  bucketMs: number | null;
  /** Columnar: time[i] (ms since epoch, bucket start) goes with min[i], max[i], avg[i], count[i]. */
  time: number[];
  min: number[];
  max: number[];
  avg: number[];
  count: number[];
  /** State and text points: the raw values (newest maxPoints of the range). */
  text?: string[];
}

export interface LatestPointDto {
  pointId: number;
  equipmentId: string;
  equipmentTag: string;
  key: string;
  quantity: string;
  measure: Measure;
  /** Canonical SI unit of `value` (the same as `site:values` socket updates carry). */
  unit: string;
  value: number | boolean | string | null;
  /** `value` formatted in the viewer's units, "—" when there is none. */
  display: string;
  ts: string | null;
  tsMs: number | null;
  ageS: number | null;
  /** Older than 3× the point's expected interval, or never received. */
  stale: boolean;
  quality: Quality | null;
  expectedIntervalS: number;
  mapped: boolean;
}

export interface SiteLatestDto {
  siteId: string;
  at: string;
  data: SiteStatus["data"];
  gateways: Array<{ id: string; name: string; protocol: string; online: boolean; lastMessageAt: string | null }>;
  points: LatestPointDto[];
}
