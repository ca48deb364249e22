import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { AuditLog } from "@/components/audit/audit-log";
import { listPeople } from "@/db/queries/people";
import { listSites } from "@/db/queries/sites";
import { isAdmin } from "@/lib/auth/viewer";
import { getDb } from "@/lib/server/runtime";
import { requirePageViewer } from "../../../(auth)/auth";

export const metadata: Metadata = { title: "Audit log" };
export const dynamic = "force-dynamic";

export default async function AuditPage() {
  const viewer = await requirePageViewer();
  if (!isAdmin(viewer)) notFound();
  const db = getDb();
  const sites = listSites(db, viewer).map((s) => ({ id: s.id, name: s.name }));
  const people = listPeople(db, viewer).map((p) => ({ id: p.id, name: p.name }));
  return (
    <section className="flex flex-col gap-4">
      <h1 className="text-2xl font-semibold">Audit log</h1>
      <p className="max-w-prose text-muted">
        Every administrative change, newest first: who, when, what, and the fields that changed. Entries cannot be
        edited or deleted.
      </p>
      <AuditLog sites={sites} people={people} />
    </section>
  );
}
