import "server-only";
import { and, asc, desc, eq, gte, inArray, lt, lte } from "drizzle-orm";
import type { Db } from "../client";
import { alarmEvents, alarms, points, readings, visitAlarms, visits } from "../schema";
import { getEquipment } from "./equipment";
import { getRefrigerantLog } from "./refrigerant";
import { listTemporaryChanges } from "./temporary-changes";
import type { LatestInMemory } from "./readings";
import { seesAllSites, type Viewer } from "@/lib/auth/viewer";
import type { EquipmentRecordDto } from "@/lib/dto/sites";
import { changesOnly, runTotals, type HistoryEvent, type RunTotals } from "@/lib/equipment-history";
import { quantities, type QuantityKey } from "@/lib/quantities";
import { renderQuantities } from "@/lib/quantity-text";

// One piece of equipment's history for staff: a customer's viewer gets null, as for equipment
// that does not exist (the page is the service company's working record).

/** The controller's fault and state points, reported as each change. */
const faultQuantities: QuantityKey[] = [
  "fault_text",
  "chiller_stop_reason",
  "chiller_alarm",
  "drive_fault",
  "fan_drive_fault",
  "pump_fault",
  "fan_drive_mode",
];
/** The point whose 0/1 says the equipment runs, by kind. */
const runQuantity: Record<string, QuantityKey> = {
  chiller: "run_status",
  air_handler: "run_status",
  pump: "pump_status",
  cooling_tower: "fan_status",
};

export interface EquipmentHistory {
  equipment: EquipmentRecordDto;
  fromMs: number;
  toMs: number;
  events: HistoryEvent[];
  run: RunTotals | null;
}

export function getEquipmentHistory(
  db: Db,
  viewer: Viewer,
  equipmentId: string,
  window: { fromMs: number; toMs: number; nowMs: number; inMemory?: LatestInMemory },
): EquipmentHistory | null {
  if (!seesAllSites(viewer)) return null;
  const eq0 = getEquipment(db, viewer, equipmentId);
  if (!eq0) return null;
  const { fromMs, toMs } = window;
  const siteHref = `/sites/${encodeURIComponent(eq0.siteId)}`;
  const events: HistoryEvent[] = [];

  // Alarms raised on this equipment's tag, each transition in event time.
  const alarmRows = db
    .select({
      alarmId: alarms.id,
      ruleId: alarms.ruleId,
      detailJson: alarms.detailJson,
      toState: alarmEvents.toState,
      cause: alarmEvents.cause,
      priority: alarmEvents.priority,
      atMs: alarmEvents.eventAtMs,
    })
    .from(alarmEvents)
    .innerJoin(alarms, eq(alarms.id, alarmEvents.alarmId))
    .where(
      and(
        eq(alarmEvents.siteId, eq0.siteId),
        eq(alarms.equipment, eq0.tag),
        gte(alarmEvents.eventAtMs, fromMs),
        lte(alarmEvents.eventAtMs, toMs),
      ),
    )
    .orderBy(asc(alarmEvents.eventAtMs))
    .all();
  for (const a of alarmRows) {
    const detail = JSON.parse(a.detailJson) as { technicianMessage?: string };
    events.push({
      atMs: a.atMs,
      kind: "alarm",
      title: `P${a.priority} ${a.ruleId.replaceAll("_", " ")}: ${a.toState.replaceAll("_", " ")}`,
      detail:
        a.cause === "condition_active" && detail.technicianMessage
          ? renderQuantities(detail.technicianMessage, viewer.unitSystem)
          : a.cause.replaceAll("_", " "),
      href: `/alarms/${encodeURIComponent(a.alarmId)}`,
    });
  }

  // The controller's faults and states: every change of each fault or state point in the window.
  const eqPoints = db
    .select({ id: points.id, quantity: points.quantity, key: points.key })
    .from(points)
    .where(eq(points.equipmentId, eq0.id))
    .all();
  for (const p of eqPoints.filter((x) => faultQuantities.includes(x.quantity as QuantityKey))) {
    const rows = db
      .select({ ts: readings.ts, value: readings.value, text: readings.text })
      .from(readings)
      .where(and(eq(readings.pointId, p.id), gte(readings.ts, fromMs), lte(readings.ts, toMs)))
      .orderBy(asc(readings.ts))
      .all();
    const label = quantities[p.quantity as QuantityKey]?.label ?? p.key;
    for (const r of changesOnly(rows, (x) => x.text ?? x.value)) {
      const shown =
        r.text ?? (r.value === null ? "—" : r.value === 1 ? "on" : r.value === 0 ? "clear" : String(r.value));
      events.push({ atMs: r.ts, kind: "fault", title: `${label}: ${shown || "clear"}` });
    }
  }

  // Starts and stops, and run hours over the window, from the run-status point.
  let run: RunTotals | null = null;
  const runPoint = eqPoints.find((p) => p.quantity === runQuantity[eq0.kind]);
  if (runPoint) {
    const before = db
      .select({ ts: readings.ts, value: readings.value })
      .from(readings)
      .where(and(eq(readings.pointId, runPoint.id), lt(readings.ts, fromMs)))
      .orderBy(desc(readings.ts))
      .limit(1)
      .get();
    const rows = db
      .select({ ts: readings.ts, value: readings.value })
      .from(readings)
      .where(and(eq(readings.pointId, runPoint.id), gte(readings.ts, fromMs), lte(readings.ts, toMs)))
      .orderBy(asc(readings.ts))
      .all()
      .filter((r) => r.value !== null)
      .map((r) => ({ ts: r.ts, on: r.value! >= 0.5 }));
    run = runTotals(
      rows,
      fromMs,
      Math.min(toMs, window.nowMs),
      before?.value == null ? undefined : { ts: before.ts, on: before.value >= 0.5 },
    );
    for (const t of run.transitions) events.push({ atMs: t.ts, kind: "run", title: t.on ? "Started" : "Stopped" });
  }

  // Temporary changes made on this equipment, and when each was put back.
  const changes = listTemporaryChanges(
    db,
    viewer,
    { siteId: eq0.siteId, equipmentId: eq0.id },
    { nowMs: window.nowMs, inMemory: window.inMemory },
  );
  for (const c of changes) {
    const href = `/visits/${encodeURIComponent(c.visitId)}`;
    if (c.madeAt >= fromMs && c.madeAt <= toMs)
      events.push({
        atMs: c.madeAt,
        kind: "change",
        title: `Changed: ${c.what} ${c.fromValue} → ${c.toValue}`,
        detail: `${c.reason} (${c.madeBy})`,
        href,
      });
    if (c.putBackAt !== null && c.putBackAt >= fromMs && c.putBackAt <= toMs)
      events.push({
        atMs: c.putBackAt,
        kind: "change",
        title: `Put back: ${c.what}`,
        detail: c.valueNow ? `now ${c.valueNow}` : undefined,
        href,
      });
  }

  // Visits that touched this equipment: through its alarms or its temporary changes.
  const visitIds = new Set(changes.map((c) => c.visitId));
  const tagged = db
    .select({ visitId: visitAlarms.visitId })
    .from(visitAlarms)
    .innerJoin(alarms, eq(alarms.id, visitAlarms.alarmId))
    .where(and(eq(alarms.siteId, eq0.siteId), eq(alarms.equipment, eq0.tag)))
    .all();
  for (const t of tagged) visitIds.add(t.visitId);
  if (visitIds.size) {
    const rows = db
      .select({
        id: visits.id,
        openedAt: visits.openedAt,
        closedAt: visits.closedAt,
        mode: visits.mode,
        summary: visits.summary,
      })
      .from(visits)
      .where(and(eq(visits.siteId, eq0.siteId), inArray(visits.id, [...visitIds])))
      .all();
    for (const v of rows) {
      const href = `/visits/${encodeURIComponent(v.id)}`;
      const opened = v.openedAt.getTime();
      if (opened >= fromMs && opened <= toMs)
        events.push({
          atMs: opened,
          kind: "visit",
          title: `Visit opened (${v.mode === "remote" ? "remote" : "on site"})`,
          href,
        });
      const closed = v.closedAt?.getTime();
      if (closed !== undefined && closed >= fromMs && closed <= toMs)
        events.push({ atMs: closed, kind: "visit", title: "Visit closed", detail: v.summary ?? undefined, href });
    }
  }

  // The refrigerant log (chillers): each entry as recorded.
  if (eq0.kind === "chiller") {
    const log = getRefrigerantLog(db, viewer, eq0.id, window.nowMs);
    for (const e of log?.entries ?? []) {
      if (e.at < fromMs || e.at > toMs) continue;
      events.push({
        atMs: e.at,
        kind: "refrigerant",
        title: `Refrigerant ${e.kind.replaceAll("_", " ")}${e.amountKg !== null ? `: ${e.amountKg} kg` : ""}`,
        detail: [e.reason, e.result].filter(Boolean).join(" · ") || undefined,
        href: `${siteHref}/equipment/${encodeURIComponent(eq0.id)}/refrigerant`,
      });
    }
  }

  return { equipment: eq0, fromMs, toMs, events, run };
}
