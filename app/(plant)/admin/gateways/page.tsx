import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { getDb } from "@/lib/server/runtime";
import { listSites } from "@/db/queries/sites";
import { isAdmin } from "@/lib/auth/viewer";
import { requirePageViewer } from "../../../(auth)/auth";

export const metadata: Metadata = { title: "Gateways" };
export const dynamic = "force-dynamic";

export default async function GatewaysIndexPage() {
  const viewer = await requirePageViewer();
  if (!isAdmin(viewer)) notFound();
  const sites = listSites(getDb(), viewer);
  return (
    <section>
      <h1 className="mb-4 text-2xl font-semibold">Gateways by site</h1>
      <ul className="flex flex-col gap-2">
        {sites.map((s) => (
          <li key={s.id}>
            <Link
              href={`/sites/${s.id}/gateways`}
              className="block rounded-lg border border-line bg-panel px-4 py-3 hover:border-ink"
            >
              {s.name} <span className="text-muted">· {s.customer.name}</span>
            </Link>
          </li>
        ))}
      </ul>
    </section>
  );
}
