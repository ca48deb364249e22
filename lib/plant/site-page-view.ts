// What the site page hands its client components, built on the server from the site's records: the
// overview's inputs and the points list, with technical identifiers for staff only. Pure.

import type { EquipmentDto, EquipmentPointsView } from "@/lib/dto/sites";
import { isQuantityKey, quantities, type Measure } from "@/lib/quantities";
import type { OverviewEquipmentInput } from "./overview-layout";

export function overviewInputs(equipment: readonly EquipmentDto[]): OverviewEquipmentInput[] {
  return equipment.map((e) => ({
    tag: e.tag,
    kind: e.kind,
    name: e.name,
    serves: e.serves,
    loop: e.loop ?? null,
    points: e.points.map((p) => ({ id: p.id, quantity: p.quantity })),
  }));
}

/** Each point's label and measure; point key and Brick class only when `staff` (never on a customer's page). */
export function pointsView(equipment: readonly EquipmentDto[], staff: boolean): EquipmentPointsView[] {
  return equipment.map((e) => ({
    id: e.id,
    tag: e.tag,
    name: e.name,
    kind: e.kind,
    capacityTons: e.capacityTons,
    refrigerant: e.refrigerant,
    serves: e.serves,
    points: e.points.map((p) => {
      const q = isQuantityKey(p.quantity) ? quantities[p.quantity] : undefined;
      const measure: Measure = q?.measure ?? "text";
      return {
        id: p.id,
        // A point outside the vocabulary has only its key for a name; customers read it as "Point".
        label: q?.label ?? (staff ? p.key : "Point"),
        measure,
        expectedIntervalS: p.expectedIntervalS,
        ...(staff ? { identifiers: { key: p.key, brickClass: p.brickClass } } : {}),
      };
    }),
  }));
}
