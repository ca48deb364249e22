import type { BoardSiteDto } from "@/lib/dto/board";
import type { BoardSort, BoardState, BoardView } from "@/lib/schemas/board";

// What the board does with its list: which states a plant is in, the urgency order, search,
// filter and the counts at the top. Pure, so the page, the tests and the browser agree.

/** Plants rendered with the page (a screenful on a desktop and more); the rest render as the list is scrolled. */
export const BOARD_FIRST_PAGE = 48;

/** The states a plant is in; "quiet" only when it is in none of the others. */
export function siteStates(site: BoardSiteDto): BoardState[] {
  const out: BoardState[] = [];
  if (site.status.worst) out.push("alarms");
  // Not live (stale, gateway offline or none): the board cannot vouch for the plant.
  if (site.status.data !== "live") out.push("stale");
  if (site.changes) out.push("changes");
  if (out.length === 0) out.push("quiet");
  return out;
}

const dataRank = { offline: 0, stale: 1, no_gateway: 2, live: 3 } as const;

/**
 * Urgency, most urgent first: active alarms by ISA-18.2 priority (1 highest), then cleared ones
 * still awaiting acknowledgement, an overdue temporary change, data not live, changes in place,
 * open requests and visits. Training plants come after every real one.
 */
export function urgencyKey(site: BoardSiteDto, nowMs: number): number[] {
  const w = site.status.worst;
  return [
    site.training ? 1 : 0,
    w ? w.priority * 2 - (w.active ? 1 : 0) : 99,
    site.changes && site.changes.earliestDueAt < nowMs ? 0 : 1,
    dataRank[site.status.data],
    site.changes ? 0 : 1,
    site.openRequests + site.openVisits > 0 ? 0 : 1,
  ];
}

const collator = new Intl.Collator("en", { sensitivity: "base", numeric: true });

function compareKeys(a: number[], b: number[]): number {
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return a[i] - b[i];
  return 0;
}

export function sortSites(sites: readonly BoardSiteDto[], sort: BoardSort, nowMs: number): BoardSiteDto[] {
  const byName = (a: BoardSiteDto, b: BoardSiteDto) => collator.compare(a.name, b.name) || a.id.localeCompare(b.id);
  const training = (s: BoardSiteDto) => (s.training ? 1 : 0);
  if (sort === "name") return [...sites].sort((a, b) => training(a) - training(b) || byName(a, b));
  if (sort === "customer")
    return [...sites].sort(
      (a, b) => training(a) - training(b) || collator.compare(a.customer.name, b.customer.name) || byName(a, b),
    );
  const keys = new Map(sites.map((s) => [s.id, urgencyKey(s, nowMs)]));
  return [...sites].sort((a, b) => compareKeys(keys.get(a.id)!, keys.get(b.id)!) || byName(a, b));
}

/** Lower case without accents, so "cafe" finds "Café". */
const fold = (text: string) =>
  text
    .normalize("NFKD")
    .replace(/\p{Diacritic}/gu, "")
    .toLowerCase();

/** Every word of the query must appear in the site's name or its customer's name. */
export function matchesSearch(site: BoardSiteDto, q: string): boolean {
  const words = fold(q).split(/\s+/).filter(Boolean);
  if (words.length === 0) return true;
  const hay = fold(`${site.name} ${site.customer.name}`);
  return words.every((w) => hay.includes(w));
}

export type BoardCounts = Record<"all" | BoardState, number>;

/** How many plants (of those the search matches) are in each state; a plant may be in several. */
export function countStates(sites: readonly BoardSiteDto[]): BoardCounts {
  const counts: BoardCounts = { all: sites.length, alarms: 0, stale: 0, changes: 0, quiet: 0 };
  for (const s of sites) for (const st of siteStates(s)) counts[st]++;
  return counts;
}

/** The list the board shows for a view, and the counts for its search. */
export function applyBoardView(
  sites: readonly BoardSiteDto[],
  view: Pick<BoardView, "q" | "state" | "sort">,
  nowMs: number,
): { shown: BoardSiteDto[]; counts: BoardCounts } {
  const found = sites.filter((s) => matchesSearch(s, view.q));
  const counts = countStates(found);
  const filtered = view.state === "all" ? found : found.filter((s) => siteStates(s).includes(view.state as BoardState));
  return { shown: sortSites(filtered, view.sort, nowMs), counts };
}
