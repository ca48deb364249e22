import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { EscalationPolicyEditor } from "@/components/oncall/escalation-policy-editor";
import { listPolicies } from "@/db/queries/notify";
import { isAdmin } from "@/lib/auth/viewer";
import { getDb } from "@/lib/server/runtime";
import { requirePageViewer } from "../../../(auth)/auth";

export const metadata: Metadata = { title: "Escalation" };
export const dynamic = "force-dynamic";

export default async function EscalationPage() {
  const viewer = await requirePageViewer();
  if (!isAdmin(viewer)) notFound();
  return (
    <section className="flex flex-col gap-4">
      <h1 className="text-2xl font-semibold">Escalation by priority</h1>
      <p className="max-w-prose text-muted">
        Which paths reach the primary on call, and when the backup and then every admin hear of an alarm nobody has
        acknowledged. An acknowledgement on any path stops it for everyone. Quiet hours never apply to the person on
        call. Someone no chosen path reaches (no device, no verified number) is e-mailed instead.
      </p>
      <EscalationPolicyEditor initial={listPolicies(getDb(), viewer)} />
    </section>
  );
}
