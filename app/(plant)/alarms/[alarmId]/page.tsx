import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { getDb, getRuntime } from "@/lib/server/runtime";
import { getAlarm } from "@/db/queries/alarms";
import { getSite } from "@/db/queries/sites";
import { AlarmCard } from "@/components/alarms/alarm-card";
import { AlarmDeliveries } from "@/components/alarms/alarm-deliveries";
import { listDeliveries } from "@/db/queries/notify";
import { AlarmTimeline } from "@/components/alarms/alarm-timeline";
import { TrendChart } from "@/components/charts/trend-chart";
import { isQuantityKey, quantities } from "@/lib/quantities";
import type { EquipmentKind } from "@/lib/quantities";
import { evidencePoints } from "@/lib/rules/evidence";
import { valuesAt } from "@/db/queries/readings";
import { ThenAndNow, type EvidenceReading } from "@/components/alarms/then-and-now";
import { canAct } from "@/lib/auth/viewer";
import { TemporaryChangeBanner } from "@/components/service/change-banner";
import { OpenVisitButton } from "@/components/service/open-visit-button";
import { openVisitsForAlarm } from "@/db/queries/visits";
import { requirePageViewer } from "../../../(auth)/auth";

export const metadata: Metadata = { title: "Alarm" };
export const dynamic = "force-dynamic";

export default async function AlarmPage({ params }: { params: Promise<{ alarmId: string }> }) {
  const viewer = await requirePageViewer();
  const db = getDb();
  const alarm = getAlarm(db, viewer, (await params).alarmId, getRuntime()?.alarms.latestDetail);
  if (!alarm) notFound();
  const site = getSite(db, viewer, alarm.siteId)!;
  const staff = canAct(viewer);
  const visits = staff ? openVisitsForAlarm(db, viewer, alarm.id) : [];
  // The rule's readings, on the alarm's equipment or a tower serving its chiller.
  const pointOf = (tag: string, q: string) =>
    site.equipment.find((e) => e.tag === tag)?.points.find((p) => p.quantity === q);
  const found = evidencePoints(
    site.equipment.map((e) => ({ tag: e.tag, kind: e.kind as EquipmentKind, serves: e.serves ?? undefined })),
    alarm.ruleId,
    alarm.equipment,
    (tag, q) => pointOf(tag, q) !== undefined,
  ).flatMap(({ tag, quantity }) => {
    const point = pointOf(tag, quantity);
    if (!point || !isQuantityKey(point.quantity)) return [];
    const q = quantities[point.quantity];
    const label = tag === alarm.equipment ? q.label : `${tag} ${q.label.toLowerCase()}`;
    return [{ id: point.id, tag, label, measure: q.measure }];
  });
  // A text, mode or on/off reading has no trend line; it still reads in the table.
  const charts = found.filter((c) => !["text", "state", "boolean"].includes(c.measure));
  const raisedAtMs = alarm.activeSinceMs ?? alarm.raisedDetail?.atMs ?? null;
  const then =
    staff && raisedAtMs !== null
      ? valuesAt(
          db,
          viewer,
          found.map((c) => c.id),
          raisedAtMs,
        )
      : new Map<number, { tsMs: number; value: number | boolean | string }>();
  const readings: EvidenceReading[] = found.map((c) => ({
    pointId: c.id,
    label: c.label,
    measure: c.measure,
    raised: then.get(c.id) ?? null,
  }));
  return (
    <article className="flex flex-col gap-6">
      <p className="text-sm">
        <Link href={`/sites/${site.id}`} className="underline">
          {site.name}
        </Link>{" "}
        · {alarm.equipment}
      </p>
      <TemporaryChangeBanner siteId={site.id} staff={staff} timeZone={site.timeZone} />
      {staff ? (
        visits.length ? (
          <p className="text-sm font-semibold">
            {visits.map((v) => (
              <Link key={v.id} href={`/visits/${v.id}`} className="underline">
                Continue the open visit ({v.technician.name})
              </Link>
            ))}
          </p>
        ) : (
          <OpenVisitButton alarmId={alarm.id} />
        )
      ) : null}
      <AlarmCard
        alarm={alarm}
        canAct={staff}
        unitSystem={viewer.unitSystem}
        timeZone={site.timeZone}
        showNumbers={false}
      />
      {staff ? (
        <ThenAndNow
          siteId={site.id}
          raisedAtMs={raisedAtMs}
          raised={
            alarm.raisedDetail
              ? {
                  atMs: alarm.raisedDetail.atMs,
                  message: alarm.raisedDetail.technicianMessage,
                  numbers: alarm.raisedDetail.numbers,
                }
              : null
          }
          latest={{ atMs: alarm.detail.atMs, message: alarm.detail.technicianMessage, numbers: alarm.detail.numbers }}
          active={alarm.conditionActive}
          readings={readings}
          unitSystem={viewer.unitSystem}
          timeZone={site.timeZone}
        />
      ) : null}
      <section>
        <h2 className="mb-2 text-lg font-semibold">History</h2>
        <AlarmTimeline events={alarm.events} staff={staff} timeZone={site.timeZone} />
      </section>
      {staff ? (
        <section>
          <h2 className="mb-2 text-lg font-semibold">Notifications</h2>
          <AlarmDeliveries deliveries={listDeliveries(db, viewer, alarm.id)} timeZone={site.timeZone} />
        </section>
      ) : null}
      {charts.length ? (
        <section className="flex flex-col gap-4">
          <h2 className="text-lg font-semibold">Readings</h2>
          {charts.map((c) => (
            <div key={c.id}>
              <h3 className="mb-1 text-sm font-semibold">
                {c.tag === alarm.equipment ? `${alarm.equipment} ${c.label}` : c.label}
              </h3>
              <TrendChart
                siteId={site.id}
                pointId={c.id}
                measure={c.measure}
                unitSystem={viewer.unitSystem}
                label={c.label}
                timeZone={site.timeZone}
              />
            </div>
          ))}
        </section>
      ) : null}
    </article>
  );
}
