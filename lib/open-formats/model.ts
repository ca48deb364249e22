import type { EquipmentKind, QuantityKey } from "@/lib/quantities";
import { towersServing, type Site } from "@/lib/plant/site";

// A site's model as the open-format exports take it: plain data read once by the runtime, so
// the Brick and Haystack builders stay pure and testable without a database.

export interface ModelSite {
  id: string;
  name: string;
  kind: string;
  address: string;
  timeZone: string;
}

export interface ModelEquipment {
  id: string;
  tag: string;
  name: string;
  kind: EquipmentKind;
  serves: string | null;
  refrigerant: string | null;
  /** The kind's record (lib/schemas/equipment.ts); a pump's `loop` says which water it moves. */
  record: Record<string, unknown>;
}

export interface ModelPoint {
  id: number;
  equipmentId: string;
  key: string;
  quantity: QuantityKey;
  unit: string;
  brickClass: string;
  expectedIntervalS: number;
  lowLimit: number | null;
  highLimit: number | null;
}

export interface SiteModel {
  site: ModelSite;
  equipment: ModelEquipment[];
  points: ModelPoint[];
}

export type WaterLoop = "chilled_water" | "condenser_water";

/**
 * Which loop a pump moves: its record's `loop` when given, else what its name says ("Chilled
 * water pump 1"); null when neither tells.
 */
export function pumpLoop(e: Pick<ModelEquipment, "name" | "record">): WaterLoop | null {
  const loop = typeof e.record.loop === "string" ? e.record.loop.toLowerCase() : "";
  if (loop.startsWith("chilled")) return "chilled_water";
  if (loop.startsWith("condenser")) return "condenser_water";
  const name = e.name.toLowerCase();
  if (name.includes("condenser")) return "condenser_water";
  if (name.includes("chilled")) return "chilled_water";
  return null;
}

export interface Feed {
  from: ModelEquipment;
  to: ModelEquipment;
  /** The water that flows, when known. */
  medium: WaterLoop | null;
}

/**
 * What feeds what in a water-cooled plant: a pump feeds the chiller it serves (its loop's
 * water), a tower feeds the condenser of the chillers it serves (lib/plant/site.ts
 * towersServing: named, or every chiller on a common header), a chiller feeds every air handler
 * through the chilled-water loop.
 */
export function plantFeeds(equipment: readonly ModelEquipment[]): Feed[] {
  const byTag = new Map(equipment.map((e) => [e.tag, e]));
  const chillers = equipment.filter((e) => e.kind === "chiller");
  const site: Site = equipment.map((e) => ({ tag: e.tag, kind: e.kind, serves: e.serves ?? undefined }));
  const feeds: Feed[] = [];
  for (const p of equipment.filter((e) => e.kind === "pump")) {
    const target = p.serves ? byTag.get(p.serves) : undefined;
    if (target) feeds.push({ from: p, to: target, medium: pumpLoop(p) });
  }
  for (const ch of chillers) {
    for (const t of towersServing(site, ch.tag))
      feeds.push({ from: byTag.get(t.tag)!, to: ch, medium: "condenser_water" });
    for (const ahu of equipment.filter((e) => e.kind === "air_handler"))
      feeds.push({ from: ch, to: ahu, medium: "chilled_water" });
  }
  return feeds;
}
