import type { Db } from "@/db/client";
import { boardSiteRows } from "@/db/queries/sites";
import { inPlaceBySite } from "@/db/queries/temporary-changes";
import type { Viewer } from "@/lib/auth/viewer";
import type { BoardSiteDto } from "@/lib/dto/board";
import { applyBoardView, BOARD_FIRST_PAGE } from "@/lib/board/board-view";
import type { BoardView } from "@/lib/schemas/board";
import { boardStatuses } from "./site-status";

/**
 * Every plant the viewer may see as the board shows it: record, live status (data and worst
 * alarm), temporary changes in place, open service requests and visits. A fixed handful of
 * queries for any number of sites; the page renders from it and `/api/board` answers it.
 */
export function readBoard(db: Db, viewer: Viewer): BoardSiteDto[] {
  const rows = boardSiteRows(db, viewer);
  if (rows.length === 0) return [];
  const ids = rows.map((r) => r.id);
  const statuses = boardStatuses(db, viewer, ids);
  const changes = inPlaceBySite(db, viewer, ids);
  return rows.map((r) => ({
    ...r,
    status: statuses.get(r.id) ?? { siteId: r.id, data: "no_gateway", worst: null, unacknowledged: 0 },
    changes: changes.get(r.id) ?? null,
  }));
}

/** What the board page renders with: the view's first screenful, its counts, and how many plants in all. */
export function readBoardFirstPage(db: Db, viewer: Viewer, view: BoardView, nowMs = Date.now()) {
  const sites = readBoard(db, viewer);
  const { shown, counts } = applyBoardView(sites, view, nowMs);
  return { initial: shown.slice(0, BOARD_FIRST_PAGE), counts, total: sites.length };
}
