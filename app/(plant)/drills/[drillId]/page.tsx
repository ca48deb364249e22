import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { alarmEventsBetween, drillSeries, getDrill } from "@/db/queries/drills";
import { DrillDebrief, type DebriefTrend } from "@/components/drills/drill-debrief";
import { quantities, type QuantityKey } from "@/lib/quantities";
import { displayUnit, fromCanonical } from "@/lib/units";
import { getDb } from "@/lib/server/runtime";
import { requirePageViewer } from "../../../(auth)/auth";

export const metadata: Metadata = { title: "Drill debrief" };
export const dynamic = "force-dynamic";

// A request-time read of the clock, outside the component (render stays pure for the linter).
function now() {
  return Date.now();
}

/** A drill's debrief: its outcome and score, trends of the points that matter for a crossover, the timeline. */
export default async function DrillPage({ params }: { params: Promise<{ drillId: string }> }) {
  const viewer = await requirePageViewer();
  const db = getDb();
  const drill = getDrill(db, viewer, (await params).drillId);
  if (!drill) notFound();
  const toMs = drill.endedAtMs ?? now();
  const wanted = [
    { tag: "CH-1", quantity: "condenser_refrigerant_pressure" },
    { tag: "CH-1", quantity: "evaporator_refrigerant_pressure" },
    { tag: "CH-1", quantity: "drive_temp" },
    { tag: "CH-1", quantity: "condenser_water_entering_temp" },
    { tag: "CH-1", quantity: "chilled_water_entering_temp" },
  ];
  const [cond, evap, drive, cwEnt, chwEnt] = drillSeries(db, drill.siteId, drill.startedAtMs, toMs, wanted);
  const system = viewer.unitSystem;
  const conv = (q: string, ys: number[]) => {
    const m = quantities[q as QuantityKey].measure;
    return { ys: ys.map((y) => Math.round(fromCanonical(y, m, system) * 10) / 10), unit: displayUnit(m, system) };
  };
  // Lift (condenser − evaporator pressure): the crossover is where it falls through zero.
  const evapAt = new Map(evap.xs.map((x, i) => [x, evap.ys[i]]));
  const liftXs = cond.xs.filter((x) => evapAt.has(x));
  const kpaPerUnit = system === "ip" ? 6.894757 : 1;
  const condAt = new Map(cond.xs.map((x, i) => [x, cond.ys[i]]));
  const lift = liftXs.map((x) => Math.round(((condAt.get(x)! - evapAt.get(x)!) / kpaPerUnit) * 10) / 10);
  const d = conv("drive_temp", drive.ys);
  const c = conv("condenser_water_entering_temp", cwEnt.ys);
  const h = conv("chilled_water_entering_temp", chwEnt.ys);
  const trends: DebriefTrend[] = [
    {
      label: `CH-1 lift, condenser − evaporator (${system === "ip" ? "psid" : "kPa"}); dashed = crossover`,
      xs: liftXs,
      ys: lift,
      zeroLine: true,
    },
    { label: `CH-1 drive temperature (${d.unit})`, xs: drive.xs, ys: d.ys },
    { label: `CH-1 condenser water entering (${c.unit})`, xs: cwEnt.xs, ys: c.ys },
    { label: `CH-1 chilled water entering (${h.unit})`, xs: chwEnt.xs, ys: h.ys },
  ];
  return (
    <article>
      <p className="mb-2 text-sm">
        <Link href={`/drills?trainee=${drill.traineeId}`} className="underline">
          {drill.traineeName}&apos;s drills
        </Link>
      </p>
      <h1 className="text-2xl font-semibold">
        Debrief: {drill.scenario} at {drill.speed}×
      </h1>
      <p className="mb-4 text-muted">
        Trainee {drill.traineeName} · started by {drill.startedByName} · {drill.siteName} · hints{" "}
        {drill.hints ? "on" : "off"}
      </p>
      <DrillDebrief
        drill={drill}
        alarmEvents={alarmEventsBetween(db, drill.siteId, drill.startedAtMs, toMs)}
        trends={trends}
        unitSystem={viewer.unitSystem}
      />
    </article>
  );
}
