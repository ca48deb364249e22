import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { getDb } from "@/db/client";
import { getAlarm } from "@/db/queries/alarms";
import { getSite } from "@/db/queries/sites";
import { AlarmCard } from "@/components/alarms/alarm-card";
import { AlarmTimeline } from "@/components/alarms/alarm-timeline";
import { canAct } from "@/lib/auth/viewer";
import { requirePageViewer } from "../../../(auth)/auth";

export const metadata: Metadata = { title: "Alarm" };
export const dynamic = "force-dynamic";

export default async function AlarmPage({ params }: { params: Promise<{ alarmId: string }> }) {
  const viewer = await requirePageViewer();
  const db = getDb();
  const alarm = getAlarm(db, viewer, (await params).alarmId);
  if (!alarm) notFound();
  const site = getSite(db, viewer, alarm.siteId)!;
  const staff = canAct(viewer);
  return (
    <article className="flex flex-col gap-6">
      <p className="text-sm">
        <Link href={`/sites/${site.id}`} className="underline">
          {site.name}
        </Link>{" "}
        · {alarm.equipment}
      </p>
      <AlarmCard alarm={alarm} canAct={staff} unitSystem={viewer.unitSystem} timeZone={site.timeZone} />
      <section>
        <h2 className="mb-2 text-lg font-semibold">History</h2>
        <AlarmTimeline events={alarm.events} staff={staff} timeZone={site.timeZone} />
      </section>
    </article>
  );
}
