import type { Metadata } from "next";
import { getDb } from "@/lib/server/runtime";
import { listSites } from "@/db/queries/sites";
import { AlarmTable } from "@/components/alarms/alarm-table";
import { canAct } from "@/lib/auth/viewer";
import { requirePageViewer } from "../../(auth)/auth";

export const metadata: Metadata = { title: "Alarms" };
export const dynamic = "force-dynamic";

export default async function AlarmsPage() {
  const viewer = await requirePageViewer();
  const sites = listSites(getDb(), viewer).map((s) => ({ id: s.id, name: s.name }));
  return (
    <section>
      <h1 className="mb-4 text-2xl font-semibold">Alarms</h1>
      <AlarmTable sites={sites} canAct={canAct(viewer)} />
    </section>
  );
}
