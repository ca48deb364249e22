"use client";

import { startTransition, useCallback, useDeferredValue, useEffect, useMemo, useRef, useState } from "react";
import useSWR from "swr";
import type { BoardSiteDto } from "@/lib/dto/board";
import type { SiteStatus } from "@/lib/realtime/events";
import { applyBoardView, BOARD_FIRST_PAGE, type BoardCounts } from "@/lib/board/board-view";
import { boardSorts, boardViewQuery, type BoardSort, type BoardView } from "@/lib/schemas/board";
import { fetchJson } from "@/lib/client/fetcher";
import { useSiteEvents } from "@/components/realtime/use-site-events";
import { useNow } from "@/components/service/use-now";
import { saveBoardSnapshot } from "@/components/pwa/service-worker";
import { SiteCard } from "./site-card";
import { SiteRow } from "./site-row";
import { dataLabel } from "./site-status-parts";

const stateFilters: Array<{ value: BoardView["state"]; label: string }> = [
  { value: "all", label: "All" },
  { value: "alarms", label: "Alarms" },
  { value: "stale", label: "Stale or no data" },
  { value: "changes", label: "Temporary changes" },
  { value: "quiet", label: "Quiet" },
];
const sortLabels: Record<BoardSort, string> = { urgency: "Most urgent first", name: "Site name", customer: "Customer" };

// The first screenful is rendered with the page, the rest as the list is scrolled: hundreds of
// cards rendered at once would hold up the first paint for plants nobody sees yet.
const FIRST_PAGE = BOARD_FIRST_PAGE;
const NEXT_PAGE = 150;

// The non-pushed parts (changes, requests, visits) change at human pace: a slow refresh covers them.
const SLOW_REFRESH_MS = 120_000;

/**
 * Every plant the viewer may see. Search, state filter, sort and layout live in the URL so a link
 * reproduces the view; `site:status` pushes over the board rooms replace one plant's status in
 * place, so hundreds of plants stay current without fetching the list again.
 */
export function SiteBoard({
  initial,
  initialCounts,
  total,
  initialView,
  canAct,
}: {
  /** The first screenful of the initial view, rendered with the page; the whole list is fetched after. */
  initial: BoardSiteDto[];
  initialCounts: BoardCounts;
  total: number;
  initialView: BoardView;
  canAct: boolean;
}) {
  const nowMs = useNow();
  const [view, setView] = useState(initialView);
  const [partial, setPartial] = useState(initial);
  // One fetch of the whole list after the first paint (hundreds of plants inlined in the page
  // would hold it up), then status pushes; the non-pushed parts refresh slowly.
  const { data, error, mutate } = useSWR<{ sites: BoardSiteDto[] }>("/api/board", fetchJson, {
    revalidateOnFocus: false,
    refreshInterval: SLOW_REFRESH_MS,
  });
  const onStatus = useCallback(
    (status: SiteStatus) => {
      // Only the plant the push is about gets a new object, so only its card re-renders.
      const apply = (list: BoardSiteDto[]) => {
        const i = list.findIndex((s) => s.id === status.siteId);
        if (i === -1) return list;
        const next = list.slice();
        next[i] = { ...next[i], status };
        return next;
      };
      setPartial(apply);
      void mutate((cached) => cached && { sites: apply(cached.sites) }, { revalidate: false });
    },
    [mutate],
  );
  useSiteEvents("board", { onStatus, onReconnect: () => void mutate() });

  const updateView = (patch: Partial<BoardView>) => {
    const next = { ...view, ...patch };
    setView(next);
    // No navigation: the list is all here, and the address keeps the view for a link or a reload.
    window.history.replaceState(null, "", `${window.location.pathname}${boardViewQuery(next)}`);
  };

  const complete = data !== undefined;
  const sites = data?.sites ?? partial;
  const deferred = useDeferredValue(view);
  const applied = useMemo(() => applyBoardView(sites, deferred, nowMs), [sites, deferred, nowMs]);
  const shown = applied.shown;
  // Until the whole list is here, the counts are the server's for the view it rendered.
  const counts = complete ? applied.counts : initialCounts;

  // The offline page shows this board, marked not live, when the phone has no connection.
  useEffect(() => {
    if (!complete) return;
    void saveBoardSnapshot(
      sites.map((s) => ({
        name: s.name,
        data: dataLabel[s.status.data],
        alarm: s.status.worst?.active ? (canAct ? s.status.worst.title : s.status.worst.ownerTitle) : null,
      })),
    ).catch(() => undefined);
  }, [sites, complete, canAct]);

  const [limit, setLimit] = useState(FIRST_PAGE);
  const moreRef = useRef<HTMLButtonElement>(null);
  const showMore = useCallback(() => startTransition(() => setLimit((n) => n + NEXT_PAGE)), []);
  const hidden = Math.max(0, shown.length - limit);
  useEffect(() => {
    const el = moreRef.current;
    if (!el || typeof IntersectionObserver === "undefined") return;
    // Well before the end comes into view, so scrolling (or tabbing) down never meets an empty end.
    const observer = new IntersectionObserver((entries) => entries.some((e) => e.isIntersecting) && showMore(), {
      rootMargin: "1200px 0px",
    });
    observer.observe(el);
    return () => observer.disconnect();
  }, [hidden, showMore]);

  const Item = view.view === "list" ? SiteRow : SiteCard;
  return (
    <section aria-labelledby="board-title" data-complete={complete || undefined}>
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <h1 id="board-title" className="text-2xl font-semibold">
          Plants
        </h1>
        <p className="text-sm text-muted" aria-live="polite" data-testid="board-shown">
          Showing {complete ? shown.length : initialCounts[initialView.state]} of {complete ? sites.length : total}
        </p>
      </div>
      {error ? <p className="mt-2 text-alarm">Could not refresh the board: {error.message}</p> : null}

      <div role="group" aria-label="Show plants by state" className="mt-3 flex flex-wrap gap-2">
        {stateFilters.map((f) => {
          const pressed = view.state === f.value;
          return (
            <button
              key={f.value}
              type="button"
              aria-pressed={pressed}
              onClick={() => updateView({ state: f.value })}
              className={`inline-flex min-h-11 items-center gap-2 rounded border px-3 text-sm font-semibold ${pressed ? "border-ink bg-ink text-panel" : "border-line bg-panel text-ink hover:border-ink"}`}
              data-testid={`board-filter-${f.value}`}
            >
              {pressed ? <span aria-hidden="true">✓</span> : null}
              {f.label}
              <span
                className={`rounded px-1.5 tabular-nums ${pressed ? "bg-panel/20" : "bg-surface"}`}
                data-testid={`board-count-${f.value}`}
              >
                {counts[f.value]}
              </span>
            </button>
          );
        })}
      </div>

      <div className="mt-3 flex flex-wrap items-end gap-3">
        <div className="flex min-w-0 flex-1 basis-60 flex-col gap-1">
          <label htmlFor="board-search" className="text-sm font-semibold">
            Search site or customer
          </label>
          <input
            id="board-search"
            type="search"
            value={view.q}
            onChange={(e) => updateView({ q: e.target.value })}
            placeholder="Name of a site or customer"
            autoComplete="off"
            className="min-h-11 w-full rounded border border-line bg-panel px-3 text-base"
          />
        </div>
        <div className="flex flex-col gap-1">
          <label htmlFor="board-sort" className="text-sm font-semibold">
            Sort
          </label>
          <select
            id="board-sort"
            value={view.sort}
            onChange={(e) => updateView({ sort: e.target.value as BoardSort })}
            className="min-h-11 rounded border border-line bg-panel px-3 text-base"
          >
            {boardSorts.map((s) => (
              <option key={s} value={s}>
                {sortLabels[s]}
              </option>
            ))}
          </select>
        </div>
        <div role="group" aria-label="Layout" className="flex">
          {(["cards", "list"] as const).map((v) => (
            <button
              key={v}
              type="button"
              aria-pressed={view.view === v}
              onClick={() => updateView({ view: v })}
              className={`min-h-11 border px-3 text-sm font-semibold first:rounded-l last:rounded-r ${view.view === v ? "border-ink bg-ink text-panel" : "border-line bg-panel text-ink hover:border-ink"}`}
              data-testid={`board-layout-${v}`}
            >
              {v === "cards" ? "Cards" : "List"}
            </button>
          ))}
        </div>
      </div>

      {sites.length === 0 ? <p className="mt-4 text-muted">No sites yet.</p> : null}
      {sites.length > 0 && shown.length === 0 ? (
        <p className="mt-4 text-muted" data-testid="board-empty">
          No plant matches this view.
        </p>
      ) : null}
      <ul
        className={
          view.view === "list"
            ? "mt-4 divide-y divide-line rounded-lg border border-line bg-panel"
            : "mt-4 grid gap-3 sm:grid-cols-2 lg:grid-cols-3"
        }
        data-testid="site-list"
        data-layout={view.view}
      >
        {shown.slice(0, limit).map((site) => (
          <Item key={site.id} site={site} canAct={canAct} nowMs={site.changes ? nowMs : 0} />
        ))}
      </ul>
      {hidden > 0 ? (
        <button
          ref={moreRef}
          type="button"
          onClick={showMore}
          className="mt-4 min-h-11 w-full rounded border border-line bg-panel px-4 text-sm font-semibold text-ink hover:border-ink"
          data-testid="board-more"
        >
          Show {Math.min(NEXT_PAGE, hidden)} more ({hidden} not shown yet)
        </button>
      ) : null}
    </section>
  );
}
