import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { RotaEditor } from "@/components/oncall/rota-editor";
import { canAct, isAdmin } from "@/lib/auth/viewer";
import { requirePageViewer } from "../../(auth)/auth";

export const metadata: Metadata = { title: "On call" };
export const dynamic = "force-dynamic";

function now() {
  return Date.now();
}

export default async function OnCallPage() {
  const viewer = await requirePageViewer();
  if (!canAct(viewer)) notFound();
  return (
    <section>
      <h1 className="text-2xl font-semibold">On call</h1>
      <p className="mb-4 mt-1 max-w-prose text-muted">
        High-priority alarms e-mail the primary at once; if nobody acknowledges within the escalation delay (10 minutes
        by default), the backup, then the admins.
      </p>
      <RotaEditor canEdit={isAdmin(viewer)} nowMs={now()} />
    </section>
  );
}
