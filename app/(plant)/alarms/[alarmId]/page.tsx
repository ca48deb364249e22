import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { getDb } from "@/lib/server/runtime";
import { getAlarm } from "@/db/queries/alarms";
import { getSite } from "@/db/queries/sites";
import { AlarmCard } from "@/components/alarms/alarm-card";
import { AlarmDeliveries } from "@/components/alarms/alarm-deliveries";
import { listDeliveries } from "@/db/queries/notify";
import { AlarmTimeline } from "@/components/alarms/alarm-timeline";
import { TrendChart } from "@/components/charts/trend-chart";
import { isQuantityKey, quantities, type QuantityKey } from "@/lib/quantities";
import { canAct } from "@/lib/auth/viewer";
import { TemporaryChangeBanner } from "@/components/service/change-banner";
import { OpenVisitButton } from "@/components/service/open-visit-button";
import { openVisitsForAlarm } from "@/db/queries/visits";
import { requirePageViewer } from "../../../(auth)/auth";

export const metadata: Metadata = { title: "Alarm" };
export const dynamic = "force-dynamic";

// The readings each rule rests on, shown under the alarm's history.
const evidence: Record<string, QuantityKey[]> = {
  crossover_risk: ["chilled_water_entering_temp", "condenser_water_entering_temp"],
  restart_race: ["chilled_water_entering_temp", "condenser_water_entering_temp"],
  loops_crossed: ["chilled_water_entering_temp", "condenser_water_entering_temp"],
  tower_fan_not_running: ["condenser_water_leaving_temp", "fan_speed"],
  head_pressure_near_trip: ["condenser_refrigerant_pressure"],
  drive_temp_toward_trip: ["drive_temp"],
  chiller_tripped: ["compressor_power"],
  efficiency_drift: ["compressor_power", "condenser_water_entering_temp"],
  low_evaporator_pressure: ["evaporator_saturated_temp"],
};

export default async function AlarmPage({ params }: { params: Promise<{ alarmId: string }> }) {
  const viewer = await requirePageViewer();
  const db = getDb();
  const alarm = getAlarm(db, viewer, (await params).alarmId);
  if (!alarm) notFound();
  const site = getSite(db, viewer, alarm.siteId)!;
  const staff = canAct(viewer);
  const visits = staff ? openVisitsForAlarm(db, viewer, alarm.id) : [];
  const equipment = site.equipment.find((e) => e.tag === alarm.equipment);
  const charts = (evidence[alarm.ruleId] ?? []).flatMap((q) => {
    const point = equipment?.points.find((p) => p.quantity === q);
    return point && isQuantityKey(point.quantity)
      ? [{ id: point.id, label: quantities[point.quantity].label, measure: quantities[point.quantity].measure }]
      : [];
  });
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
      <AlarmCard alarm={alarm} canAct={staff} unitSystem={viewer.unitSystem} timeZone={site.timeZone} />
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
                {alarm.equipment} {c.label}
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
