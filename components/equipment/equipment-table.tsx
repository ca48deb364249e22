"use client";

import { createColumnHelper, flexRender, getCoreRowModel, useReactTable } from "@tanstack/react-table";
import Link from "next/link";
import { useMemo, useState } from "react";
import { CHW_LOOP } from "@/lib/schemas/equipment";
import { equipmentKindLabels, type EquipmentKindName } from "@/lib/plant/equipment-form";

export interface EquipmentRow {
  id: string;
  tag: string;
  kind: string;
  name: string;
  serves: string | null;
  retired: boolean;
}

const column = createColumnHelper<EquipmentRow>();

const servesText = (r: EquipmentRow) =>
  r.serves === CHW_LOOP
    ? "Chilled-water loop"
    : r.serves
      ? r.serves
      : r.kind === "pump" || r.kind === "cooling_tower"
        ? "Common header"
        : "—";

/** A site's equipment records; each tag opens its record. */
export function EquipmentTable({ siteId, rows }: { siteId: string; rows: EquipmentRow[] }) {
  const [showRetired, setShowRetired] = useState(false);
  const columns = useMemo(
    () => [
      column.accessor("tag", {
        header: "Tag",
        cell: (c) => (
          <Link
            href={`/sites/${encodeURIComponent(siteId)}/setup/${encodeURIComponent(c.row.original.id)}`}
            className="font-semibold underline"
          >
            {c.getValue()}
          </Link>
        ),
      }),
      column.accessor("kind", {
        header: "Kind",
        cell: (c) => equipmentKindLabels[c.getValue() as EquipmentKindName] ?? c.getValue(),
      }),
      column.accessor("name", { header: "Name", meta: { className: "hidden sm:table-cell" } }),
      column.accessor(servesText, { id: "serves", header: "Serves", meta: { className: "hidden md:table-cell" } }),
      column.accessor((r) => (r.retired ? "Retired" : "In service"), { id: "status", header: "Status" }),
    ],
    [siteId],
  );
  const data = useMemo(() => rows.filter((r) => showRetired || !r.retired), [rows, showRetired]);
  const table = useReactTable({ data, columns, getCoreRowModel: getCoreRowModel() });
  const retiredCount = rows.filter((r) => r.retired).length;
  return (
    <div className="flex flex-col gap-2">
      {retiredCount ? (
        <label className="flex min-h-11 items-center gap-2 text-sm">
          <input type="checkbox" checked={showRetired} onChange={(e) => setShowRetired(e.target.checked)} />
          Show retired equipment ({retiredCount})
        </label>
      ) : null}
      <div
        tabIndex={0}
        role="region"
        aria-label="Equipment"
        className="overflow-x-auto rounded-lg border border-line bg-panel"
      >
        <table className="w-full text-sm" data-testid="equipment-table">
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
                  No equipment yet: add the chillers first, then towers, pumps and the rest.
                </td>
              </tr>
            ) : null}
          </tbody>
        </table>
      </div>
    </div>
  );
}
