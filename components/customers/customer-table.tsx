"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import {
  createColumnHelper,
  flexRender,
  getCoreRowModel,
  getSortedRowModel,
  useReactTable,
  type SortingState,
} from "@tanstack/react-table";
import Link from "next/link";
import { useRouter } from "next/navigation";
import { useMemo, useState } from "react";
import { useForm } from "react-hook-form";
import { customerSchema, type CustomerInput } from "@/lib/schemas/customers";
import type { CustomerDto } from "@/lib/dto/sites";
import { ApiError, fetchJson } from "@/lib/client/fetcher";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";

const column = createColumnHelper<CustomerDto>();

/** The customers: name, sites in service, retired or not; each name opens the customer. */
export function CustomerTable({ customers }: { customers: CustomerDto[] }) {
  const [showRetired, setShowRetired] = useState(false);
  const [sorting, setSorting] = useState<SortingState>([{ id: "name", desc: false }]);
  const columns = useMemo(
    () => [
      column.accessor("name", {
        header: "Customer",
        cell: (c) => (
          <Link href={`/admin/customers/${encodeURIComponent(c.row.original.id)}`} className="font-semibold underline">
            {c.getValue()}
          </Link>
        ),
      }),
      column.accessor("siteCount", {
        header: "Sites",
        cell: (c) => <span className="tabular-nums">{c.getValue()}</span>,
      }),
      column.accessor((c) => (c.retiredAtMs ? "Retired" : "In service"), { id: "status", header: "Status" }),
    ],
    [],
  );
  const data = useMemo(() => customers.filter((c) => showRetired || !c.retiredAtMs), [customers, showRetired]);
  const table = useReactTable({
    data,
    columns,
    state: { sorting },
    onSortingChange: setSorting,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
  });
  const retiredCount = customers.filter((c) => c.retiredAtMs).length;
  return (
    <div className="flex flex-col gap-2">
      <label className="flex min-h-11 items-center gap-2 text-sm">
        <input type="checkbox" checked={showRetired} onChange={(e) => setShowRetired(e.target.checked)} />
        Show retired customers ({retiredCount})
      </label>
      <div
        tabIndex={0}
        role="region"
        aria-label="Customers"
        className="overflow-x-auto rounded-lg border border-line bg-panel"
      >
        <table className="w-full text-sm" data-testid="customer-table">
          <thead className="text-left text-muted">
            {table.getHeaderGroups().map((g) => (
              <tr key={g.id}>
                {g.headers.map((h) => (
                  <th
                    key={h.id}
                    scope="col"
                    className="px-3 py-2 font-normal"
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
              <tr key={row.id} className={`border-t border-line/60 ${row.original.retiredAtMs ? "text-muted" : ""}`}>
                {row.getVisibleCells().map((cell) => (
                  <td key={cell.id} className="px-3 py-2 align-top">
                    {flexRender(cell.column.columnDef.cell, cell.getContext())}
                  </td>
                ))}
              </tr>
            ))}
            {data.length === 0 ? (
              <tr>
                <td colSpan={columns.length} className="px-3 py-4 text-muted">
                  No customers yet: add the first one below.
                </td>
              </tr>
            ) : null}
          </tbody>
        </table>
      </div>
    </div>
  );
}

/** Adds a customer organization and opens it, where its sites are added. */
export function AddCustomerForm() {
  const router = useRouter();
  const [message, setMessage] = useState<string | null>(null);
  const {
    register,
    handleSubmit,
    setError,
    formState: { errors, isSubmitting },
  } = useForm<CustomerInput>({ resolver: zodResolver(customerSchema), defaultValues: { name: "" } });
  return (
    <form
      noValidate
      aria-label="Add customer"
      onSubmit={handleSubmit(async (values) => {
        setMessage(null);
        try {
          const res = await fetchJson<{ customer: CustomerDto }>("/api/customers", {
            method: "POST",
            body: JSON.stringify(values),
          });
          router.push(`/admin/customers/${encodeURIComponent(res.customer.id)}`);
        } catch (err) {
          if (err instanceof ApiError) for (const f of err.fieldErrors) setError("name", { message: f.message });
          setMessage((err as Error).message);
        }
      })}
      className="flex flex-col gap-3 rounded-lg border border-line bg-panel p-4 sm:flex-row sm:items-end"
    >
      <div className="grow">
        <Field
          id="customer-name"
          label="Customer name"
          placeholder="The organization that owns the building"
          error={errors.name?.message}
          {...register("name")}
        />
      </div>
      <Button type="submit" disabled={isSubmitting}>
        Add customer
      </Button>
      {message ? <p className="text-sm text-alarm">{message}</p> : null}
    </form>
  );
}
