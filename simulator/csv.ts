// CSV output of a run: `ts,point,value,unit` rows in wire units, plus optional event comment lines.
import { equipmentOf, type SiteLayout } from "./layout";
import { formatWireValue, pointName, wireUnitOf } from "./points";
import type { RunSample, SimEvent } from "./run";
import { csvCell } from "@/lib/csv";
import type { EquipmentKind } from "@/lib/quantities";

export const csvHeader = "ts,point,value,unit";

/** Events are CSV comment lines: `# event,<ISO ts>,<kind>,<equipment or ->,<message>` (the `-` is ours, not data). */
export function eventLine(e: SimEvent): string {
  const equipment = e.equipment ? csvCell(e.equipment) : "-";
  return `# event,${new Date(e.tsMs).toISOString()},${csvCell(e.kind)},${equipment},${csvCell(e.message)}`;
}

export function csvLinesOfSample(sample: RunSample, kindOf: Map<string, EquipmentKind>, withEvents: boolean): string[] {
  const lines: string[] = [];
  if (withEvents) for (const e of sample.events) lines.push(eventLine(e));
  const ts = new Date(sample.tsMs).toISOString();
  for (const r of sample.readings) {
    const kind = kindOf.get(r.equipment);
    if (!kind) continue;
    lines.push(
      `${ts},${csvCell(pointName(r.equipment, kind, r.quantity))},${csvCell(formatWireValue(r.quantity, r.value))},${csvCell(wireUnitOf(r.quantity))}`,
    );
  }
  return lines;
}

export function equipmentKinds(layout: SiteLayout): Map<string, EquipmentKind> {
  return new Map(equipmentOf(layout).map((e) => [e.tag, e.kind]));
}

/** Write a whole run as CSV through `write` (chunked per sample so memory stays flat). */
export function writeCsv(
  samples: Iterable<RunSample>,
  layout: SiteLayout,
  write: (chunk: string) => void,
  withEvents = false,
): void {
  const kinds = equipmentKinds(layout);
  write(csvHeader + "\n");
  for (const s of samples) {
    const lines = csvLinesOfSample(s, kinds, withEvents);
    if (lines.length > 0) write(lines.join("\n") + "\n");
  }
}
