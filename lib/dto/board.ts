import type { SiteStatus } from "@/lib/realtime/events";
import type { SiteSummaryDto } from "./sites";

/** Temporary changes in place at a site: how many, since when, and the earliest put-back-by. */
export interface BoardChangesDto {
  count: number;
  oldestMadeAt: number;
  earliestDueAt: number;
}

/** One plant as the board shows it; `status` is kept current by `site:status` pushes. */
export interface BoardSiteDto extends SiteSummaryDto {
  /** A simulated plant for drills: staff only, marked and listed after real plants. */
  training: boolean;
  status: SiteStatus;
  changes: BoardChangesDto | null;
  /** Service requests not yet done or cancelled. */
  openRequests: number;
  /** Visits opened and not closed. */
  openVisits: number;
}
