import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { getCustomer } from "@/db/queries/customers";
import { getSiteRecord, listSites } from "@/db/queries/sites";
import { isAdmin } from "@/lib/auth/viewer";
import { getDb } from "@/lib/server/runtime";
import { CustomerNameForm, CustomerRetirement } from "@/components/customers/customer-editor";
import { CustomerSitesTable } from "@/components/customers/customer-sites-table";
import { SiteForm } from "@/components/sites/site-form";
import { formatDateTime } from "@/lib/client/format";
import { requirePageViewer } from "../../../../(auth)/auth";

export const metadata: Metadata = { title: "Customer" };
export const dynamic = "force-dynamic";

export default async function CustomerPage({ params }: { params: Promise<{ customerId: string }> }) {
  const viewer = await requirePageViewer();
  if (!isAdmin(viewer)) notFound();
  const db = getDb();
  const customer = getCustomer(db, viewer, (await params).customerId);
  if (!customer) notFound();
  const sites = listSites(db, viewer, { includeRetired: true })
    .filter((s) => s.customer.id === customer.id)
    .map((s) => ({ ...s, retired: getSiteRecord(db, viewer, s.id)?.retiredAtMs != null }));
  const retired = customer.retiredAtMs !== null;
  return (
    <section className="flex flex-col gap-6">
      <div>
        <p className="text-sm">
          <Link href="/admin/customers" className="underline">
            Customers
          </Link>
        </p>
        <h1 className="text-2xl font-semibold">{customer.name}</h1>
        {retired ? (
          <p className="mt-1 text-sm text-alarm">
            Retired {formatDateTime(customer.retiredAtMs)}: its sites are off the board and their gateways refused.
          </p>
        ) : null}
      </div>
      <CustomerNameForm customer={customer} />
      <div className="flex flex-col gap-2">
        <h2 className="text-lg font-semibold">Sites</h2>
        <CustomerSitesTable rows={sites} />
      </div>
      {retired ? null : (
        <div className="flex flex-col gap-2">
          <h2 className="text-lg font-semibold">Add a site</h2>
          <SiteForm customerId={customer.id} />
        </div>
      )}
      <div className="flex flex-col gap-2">
        <h2 className="text-lg font-semibold">{retired ? "Restore" : "Retire"}</h2>
        <CustomerRetirement customer={customer} />
      </div>
    </section>
  );
}
