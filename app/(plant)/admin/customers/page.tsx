import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { listCustomers } from "@/db/queries/customers";
import { isAdmin } from "@/lib/auth/viewer";
import { getDb } from "@/lib/server/runtime";
import { AddCustomerForm, CustomerTable } from "@/components/customers/customer-table";
import { requirePageViewer } from "../../../(auth)/auth";

export const metadata: Metadata = { title: "Customers" };
export const dynamic = "force-dynamic";

export default async function CustomersPage() {
  const viewer = await requirePageViewer();
  if (!isAdmin(viewer)) notFound();
  const customers = listCustomers(getDb(), viewer, { includeRetired: true });
  return (
    <section className="flex flex-col gap-4">
      <div>
        <h1 className="text-2xl font-semibold">Customers</h1>
        <p className="mt-1 max-w-prose text-sm text-muted">
          The organizations that own the buildings. Open a customer to add its sites; a site holds its equipment, points
          and gateways.
        </p>
      </div>
      <CustomerTable customers={customers} />
      <AddCustomerForm />
    </section>
  );
}
