import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { getEquipment, listEquipment } from "@/db/queries/equipment";
import { getSiteRecord } from "@/db/queries/sites";
import { isAdmin } from "@/lib/auth/viewer";
import { equipmentKindLabels, equipmentKinds, recordToForm, type EquipmentKindName } from "@/lib/plant/equipment-form";
import { getDb } from "@/lib/server/runtime";
import { ChillerLimitsForm } from "@/components/equipment/chiller-limits-form";
import { EquipmentForm } from "@/components/equipment/equipment-form";
import { EquipmentRetirement } from "@/components/equipment/equipment-retirement";
import { formatDateTime } from "@/lib/client/format";
import { requirePageViewer } from "../../../../../(auth)/auth";

export const metadata: Metadata = { title: "Equipment" };
export const dynamic = "force-dynamic";

type Props = { params: Promise<{ siteId: string; equipmentId: string }> };

function safeDecode(segment: string): string {
  try {
    return decodeURIComponent(segment);
  } catch {
    return segment;
  }
}

export default async function EquipmentPage({ params }: Props) {
  const viewer = await requirePageViewer();
  const { siteId, equipmentId: rawEquipmentId } = await params;
  // Equipment ids hold a colon (site:tag), which arrives percent-encoded in the path segment.
  const equipmentId = safeDecode(rawEquipmentId);
  const db = getDb();
  const site = getSiteRecord(db, viewer, siteId);
  const item = getEquipment(db, viewer, equipmentId);
  if (!site || !item || item.siteId !== site.id || !isAdmin(viewer)) notFound();
  const kind = item.kind as EquipmentKindName;
  if (!equipmentKinds.includes(kind)) notFound();
  const chillerTags = listEquipment(db, viewer, site.id)
    .filter((e) => e.kind === "chiller")
    .map((e) => e.tag);
  const retired = item.retiredAtMs !== null;
  return (
    <section className="flex flex-col gap-6">
      <div>
        <p className="flex flex-wrap gap-x-2 text-sm">
          <Link href={`/sites/${encodeURIComponent(site.id)}/setup`} className="underline">
            Set up {site.name}
          </Link>
        </p>
        <h1 className="text-2xl font-semibold">
          {item.tag} <span className="font-normal text-muted">· {equipmentKindLabels[kind]}</span>
        </h1>
        <p className="text-muted">{item.name}</p>
        {retired ? (
          <p className="mt-1 text-sm text-alarm">
            Retired {formatDateTime(item.retiredAtMs, site.timeZone)} (site time): the rules no longer use it.
          </p>
        ) : null}
      </div>
      {retired ? null : (
        <div className="flex flex-col gap-2">
          <h2 className="text-lg font-semibold">Record</h2>
          <EquipmentForm
            siteId={site.id}
            unitSystem={viewer.unitSystem}
            chillerTags={chillerTags}
            existing={{ id: item.id, kind }}
            initial={recordToForm(kind, item, viewer.unitSystem)}
          />
        </div>
      )}
      {kind === "chiller" && item.limits && !retired ? (
        <div className="flex flex-col gap-2">
          <h2 className="text-lg font-semibold">Limits and settings</h2>
          <ChillerLimitsForm
            equipmentId={item.id}
            limits={item.limits}
            unitSystem={viewer.unitSystem}
            timeZone={site.timeZone}
          />
        </div>
      ) : null}
      <EquipmentRetirement equipmentId={item.id} tag={item.tag} retired={retired} />
    </section>
  );
}
