import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { OnCallNow } from "@/components/oncall/on-call-now";
import { RotaEditor } from "@/components/oncall/rota-editor";
import { listShifts } from "@/db/queries/oncall";
import { nowAndNext } from "@/lib/oncall/rota";
import { getDb } from "@/lib/server/runtime";
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
  const atMs = now();
  const { now: current, next } = nowAndNext(listShifts(getDb(), atMs), atMs);
  return (
    <section>
      <h1 className="text-2xl font-semibold">On call</h1>
      <p className="mb-4 mt-1 max-w-prose text-muted">
        Alarms reach the primary at once — critical ones by push and text, high by push, the rest by e-mail — and, while
        nobody acknowledges, the backup and then the admins after each priority&apos;s delay (critical 3 and 6 minutes,
        high 10; admins can change these under Admin → Escalation).
      </p>
      <OnCallNow now={current} next={next} />
      <RotaEditor canEdit={isAdmin(viewer)} nowMs={now()} />
    </section>
  );
}
