"use client";

import {
  createColumnHelper,
  flexRender,
  getCoreRowModel,
  getSortedRowModel,
  useReactTable,
  type SortingState,
} from "@tanstack/react-table";
import Link from "next/link";
import { useMemo, useState } from "react";
import useSWR from "swr";
import type { AlarmDto } from "@/lib/dto/alarms";
import { fetchJson } from "@/lib/client/fetcher";
import { formatDateTime } from "@/lib/client/format";
import { useSiteEvents } from "@/components/realtime/use-site-events";
import { ownerStateLabel, PriorityBadge, stateLabel } from "./priority";

const column = createColumnHelper<AlarmDto>();

declare module "@tanstack/react-table" {
  // Lets a column hide itself on narrow screens. Declaration merging needs the library's own
  // type parameters, used or not.
  // eslint-disable-next-line @typescript-eslint/no-unused-vars
  interface ColumnMeta<TData, TValue> {
    className?: string;
  }
}
// ISA-18.2: shelved and suppressed alarms stay out of the main list but can be looked up.
const stateFilters = [
  { value: "unacknowledged,acknowledged,returned_unacknowledged,latched", label: "All active" },
  { value: "unacknowledged,returned_unacknowledged,latched", label: "Needs acknowledgement" },
  { value: "acknowledged", label: "Acknowledged" },
  { value: "shelved", label: "Shelved" },
  { value: "suppressed_by_design,out_of_service", label: "Suppressed / out of service" },
];

export function AlarmTable({ sites, canAct }: { sites: Array<{ id: string; name: string }>; canAct: boolean }) {
  const [site, setSite] = useState("");
  const [state, setState] = useState(stateFilters[0].value);
  const [priority, setPriority] = useState("");
  const [sorting, setSorting] = useState<SortingState>([{ id: "priority", desc: false }]);
  const query = new URLSearchParams({
    ...(site && { site }),
    ...(state && { state }),
    ...(priority && { priority }),
  }).toString();
  const { data, error, mutate } = useSWR<{ alarms: AlarmDto[] }>(`/api/alarms${query ? `?${query}` : ""}`, fetchJson);
  useSiteEvents("board", { onStatus: () => void mutate(), onReconnect: () => void mutate() });

  const columns = useMemo(
    () => [
      column.accessor("priority", { header: "Priority", cell: (c) => <PriorityBadge priority={c.getValue()} /> }),
      column.accessor("siteName", { header: "Site", meta: { className: "hidden sm:table-cell" } }),
      column.accessor("equipment", { header: "Equipment", meta: { className: "hidden sm:table-cell" } }),
      column.accessor(
        (a) => (canAct ? a.detail.technicianMessage : a.detail.ownerMessage || a.detail.technicianMessage),
        {
          id: "message",
          header: "What",
          cell: (c) => (
            <>
              <span className="block text-xs text-muted sm:hidden">{c.row.original.siteName}</span>
              <Link href={`/alarms/${c.row.original.id}`} className="font-semibold hover:underline">
                {c.getValue()}
              </Link>
            </>
          ),
        },
      ),
      column.accessor("state", {
        header: "State",
        cell: (c) => (canAct ? stateLabel : ownerStateLabel)[c.getValue()] ?? c.getValue(),
      }),
      column.accessor("lastTransitionMs", {
        header: "Last change (site time)",
        // In each alarm's site time, as on the site page and the alarm's own page.
        cell: (c) => formatDateTime(c.getValue(), c.row.original.siteTimeZone),
        meta: { className: "hidden md:table-cell" },
      }),
    ],
    [canAct],
  );
  const table = useReactTable({
    data: data?.alarms ?? [],
    columns,
    state: { sorting },
    onSortingChange: setSorting,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
  });

  const select = "min-h-11 rounded border border-line bg-panel px-2";
  return (
    <div className="flex flex-col gap-3">
      <div className="flex flex-wrap gap-3" role="group" aria-label="Filters">
        <label className="flex flex-col text-sm">
          Site
          <select className={select} value={site} onChange={(e) => setSite(e.target.value)}>
            <option value="">All sites</option>
            {sites.map((s) => (
              <option key={s.id} value={s.id}>
                {s.name}
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col text-sm">
          State
          <select className={select} value={state} onChange={(e) => setState(e.target.value)}>
            {stateFilters.map((f) => (
              <option key={f.value} value={f.value}>
                {f.label}
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col text-sm">
          Priority
          <select className={select} value={priority} onChange={(e) => setPriority(e.target.value)}>
            <option value="">Any</option>
            {[1, 2, 3, 4].map((p) => (
              <option key={p} value={p}>
                {["", "Critical", "High", "Medium", "Low"][p]}
              </option>
            ))}
          </select>
        </label>
      </div>
      {error ? <p className="text-alarm">{error.message}</p> : null}
      <div
        tabIndex={0}
        role="region"
        aria-label="Alarms"
        className="overflow-x-auto rounded-lg border border-line bg-panel"
      >
        <table className="w-full text-sm" data-testid="alarm-table">
          <thead className="text-left text-muted">
            {table.getHeaderGroups().map((g) => (
              <tr key={g.id}>
                {g.headers.map((h) => (
                  <th
                    key={h.id}
                    scope="col"
                    className={`px-3 py-2 font-normal ${h.column.columnDef.meta?.className ?? ""}`}
                    aria-sort={
                      h.column.getIsSorted()
                        ? h.column.getIsSorted() === "asc"
                          ? "ascending"
                          : "descending"
                        : undefined
                    }
                  >
                    <button
                      type="button"
                      className="min-h-11 hover:underline"
                      onClick={h.column.getToggleSortingHandler()}
                    >
                      {flexRender(h.column.columnDef.header, h.getContext())}
                      {{ asc: " ▲", desc: " ▼" }[h.column.getIsSorted() as string] ?? ""}
                    </button>
                  </th>
                ))}
              </tr>
            ))}
          </thead>
          <tbody>
            {table.getRowModel().rows.map((row) => (
              <tr key={row.id} className="border-t border-line/60">
                {row.getVisibleCells().map((cell) => (
                  <td key={cell.id} className={`px-3 py-2 align-top ${cell.column.columnDef.meta?.className ?? ""}`}>
                    {flexRender(cell.column.columnDef.cell, cell.getContext())}
                  </td>
                ))}
              </tr>
            ))}
            {data && data.alarms.length === 0 ? (
              <tr>
                <td colSpan={columns.length} className="px-3 py-4 text-muted">
                  No alarms match.
                </td>
              </tr>
            ) : null}
          </tbody>
        </table>
      </div>
    </div>
  );
}
