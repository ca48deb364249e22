import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { PeopleManager } from "@/components/people/people-manager";
import { isAdmin } from "@/lib/auth/viewer";
import { requirePageViewer } from "../../../(auth)/auth";

export const metadata: Metadata = { title: "People" };
export const dynamic = "force-dynamic";

export default async function PeoplePage() {
  const viewer = await requirePageViewer();
  if (!isAdmin(viewer)) notFound();
  return (
    <section className="flex flex-col gap-4">
      <h1 className="text-2xl font-semibold">People</h1>
      <p className="max-w-prose text-muted">
        Invite technicians, administrators and customer users by e-mail; each chooses a password through a single-use
        link. Disabling someone signs them out everywhere at once.
      </p>
      <PeopleManager selfId={viewer.userId} />
    </section>
  );
}
