import { z } from "zod";

// The board's view as the URL carries it, so a link reproduces a view. Anything unreadable falls
// back to the default rather than failing: an old or hand-edited link still opens the board.

export const boardStates = ["alarms", "stale", "changes", "quiet"] as const;
export type BoardState = (typeof boardStates)[number];
export const boardSorts = ["urgency", "name", "customer"] as const;
export type BoardSort = (typeof boardSorts)[number];
export const boardLayouts = ["cards", "list"] as const;
export type BoardLayout = (typeof boardLayouts)[number];

export const boardViewSchema = z.object({
  q: z.string().trim().max(100).catch("").default(""),
  state: z
    .enum(["all", ...boardStates])
    .catch("all")
    .default("all"),
  sort: z.enum(boardSorts).catch("urgency").default("urgency"),
  view: z.enum(boardLayouts).catch("cards").default("cards"),
});
export type BoardView = z.infer<typeof boardViewSchema>;

export const defaultBoardView: BoardView = { q: "", state: "all", sort: "urgency", view: "cards" };

/** Reads a view from search params (a page's `searchParams` or `URLSearchParams`); first value wins. */
export function parseBoardView(params: URLSearchParams | Record<string, string | string[] | undefined>): BoardView {
  const get = (k: string) => {
    const v = params instanceof URLSearchParams ? params.get(k) : params[k];
    return (Array.isArray(v) ? v[0] : v) ?? undefined;
  };
  return boardViewSchema.parse({ q: get("q"), state: get("state"), sort: get("sort"), view: get("view") });
}

/** The query string of a view, defaults left out so the plain board keeps its plain address. */
export function boardViewQuery(view: BoardView): string {
  const p = new URLSearchParams();
  if (view.q) p.set("q", view.q);
  if (view.state !== defaultBoardView.state) p.set("state", view.state);
  if (view.sort !== defaultBoardView.sort) p.set("sort", view.sort);
  if (view.view !== defaultBoardView.view) p.set("view", view.view);
  const s = p.toString();
  return s ? `?${s}` : "";
}
