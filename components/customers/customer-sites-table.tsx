"use client";

import { createColumnHelper, flexRender, getCoreRowModel, useReactTable } from "@tanstack/react-table";
import Link from "next/link";
import { useMemo, useState } from "react";

export interface CustomerSiteRow {
  id: string;
  name: string;
  kind: string;
  address: string;
  timeZone: string;
  equipmentCount: number;
  retired: boolean;
}

const column = createColumnHelper<CustomerSiteRow>();

/** A customer's sites; each name opens the site's setup page. */
export function CustomerSitesTable({ rows }: { rows: CustomerSiteRow[] }) {
  const [showRetired, setShowRetired] = useState(false);
  const columns = useMemo(
    () => [
      column.accessor("name", {
        header: "Site",
        cell: (c) => (
          <>
            <Link href={`/sites/${encodeURIComponent(c.row.original.id)}/setup`} className="font-semibold underline">
              {c.getValue()}
            </Link>
            <span className="block text-xs text-muted sm:hidden">{c.row.original.kind}</span>
          </>
        ),
      }),
      column.accessor("kind", { header: "Building", meta: { className: "hidden sm:table-cell" } }),
      column.accessor("address", { header: "Address", meta: { className: "hidden md:table-cell" } }),
      column.accessor("equipmentCount", {
        header: "Equipment",
        cell: (c) => <span className="tabular-nums">{c.getValue()}</span>,
      }),
      column.accessor((r) => (r.retired ? "Retired" : "In service"), { id: "status", header: "Status" }),
    ],
    [],
  );
  const data = useMemo(() => rows.filter((r) => showRetired || !r.retired), [rows, showRetired]);
  const table = useReactTable({ data, columns, getCoreRowModel: getCoreRowModel() });
  const retiredCount = rows.filter((r) => r.retired).length;
  return (
    <div className="flex flex-col gap-2">
      {retiredCount ? (
        <label className="flex min-h-11 items-center gap-2 text-sm">
          <input type="checkbox" checked={showRetired} onChange={(e) => setShowRetired(e.target.checked)} />
          Show retired sites ({retiredCount})
        </label>
      ) : null}
      <div
        tabIndex={0}
        role="region"
        aria-label="Sites"
        className="overflow-x-auto rounded-lg border border-line bg-panel"
      >
        <table className="w-full text-sm" data-testid="site-table">
          <thead className="text-left text-muted">
            {table.getHeaderGroups().map((g) => (
              <tr key={g.id}>
                {g.headers.map((h) => (
                  <th
                    key={h.id}
                    scope="col"
                    className={`px-3 py-2 font-normal ${h.column.columnDef.meta?.className ?? ""}`}
                  >
                    {flexRender(h.column.columnDef.header, h.getContext())}
                  </th>
                ))}
              </tr>
            ))}
          </thead>
          <tbody>
            {table.getRowModel().rows.map((row) => (
              <tr key={row.id} className={`border-t border-line/60 ${row.original.retired ? "text-muted" : ""}`}>
                {row.getVisibleCells().map((cell) => (
                  <td key={cell.id} className={`px-3 py-2 align-top ${cell.column.columnDef.meta?.className ?? ""}`}>
                    {flexRender(cell.column.columnDef.cell, cell.getContext())}
                  </td>
                ))}
              </tr>
            ))}
            {data.length === 0 ? (
              <tr>
                <td colSpan={columns.length} className="px-3 py-4 text-muted">
                  No sites yet: add one below.
                </td>
              </tr>
            ) : null}
          </tbody>
        </table>
      </div>
    </div>
  );
}
