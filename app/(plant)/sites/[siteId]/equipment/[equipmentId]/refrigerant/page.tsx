import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { getDb } from "@/lib/server/runtime";
import { getRefrigerantLog } from "@/db/queries/refrigerant";
import { RefrigerantLogPanel } from "@/components/refrigerant/refrigerant-log-panel";
import { canAct } from "@/lib/auth/viewer";
import { pathParam } from "@/lib/server/http";
import { requirePageViewer } from "../../../../../../(auth)/auth";

export const metadata: Metadata = { title: "Refrigerant log" };
export const dynamic = "force-dynamic";

type Props = { params: Promise<{ siteId: string; equipmentId: string }> };

export default async function RefrigerantLogPage({ params }: Props) {
  const viewer = await requirePageViewer();
  const { siteId, equipmentId } = await params;
  const log = getRefrigerantLog(getDb(), viewer, pathParam(equipmentId));
  // Another site's chiller under this site's address looks like one that does not exist.
  if (!log || log.equipment.siteId !== pathParam(siteId)) notFound();
  return (
    <section className="flex flex-col gap-4">
      <p className="text-sm">
        <Link href={`/sites/${encodeURIComponent(log.equipment.siteId)}`} className="underline">
          Back to the site
        </Link>
      </p>
      <h1 className="text-2xl font-semibold">
        Refrigerant log · {log.equipment.tag} {log.equipment.name}
        {log.equipment.refrigerant ? ` (${log.equipment.refrigerant})` : ""}
      </h1>
      <RefrigerantLogPanel initial={log} canAct={canAct(viewer)} unitSystem={viewer.unitSystem} />
    </section>
  );
}
