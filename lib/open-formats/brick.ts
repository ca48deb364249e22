import { DataFactory, Writer, type Quad } from "n3";
import { plantFeeds, pumpLoop, type ModelEquipment, type SiteModel } from "./model";

// A site's model as Brick 1.4 in Turtle (https://brickschema.org). Classes and relations:
// brick:Site; equipment classes below; each point a brick:<class> from lib/quantities.ts
// (plant-reference.md §9) with brick:isPointOf / brick:hasPoint; equipment brick:hasLocation the
// site; brick:feeds along the water; units as QUDT unit IRIs through brick:hasUnit.

export const BRICK = "https://brickschema.org/schema/Brick#";
export const RDF = "http://www.w3.org/1999/02/22-rdf-syntax-ns#";
export const RDFS = "http://www.w3.org/2000/01/rdf-schema#";
export const QUDT_UNIT = "http://qudt.org/vocab/unit/";

/** The namespace of one site's entities: stable across exports, so two exports of a site can be compared. */
export const siteNamespace = (siteId: string) => `urn:liftline:site:${encodeURIComponent(siteId)}#`;

/** Canonical units as QUDT unit local names (qudt.org/vocab/unit); none for on/off, states and text. */
export const qudtUnits: Record<string, string> = {
  degC: "DEG_C",
  kPa: "KiloPA",
  "L/s": "L-PER-SEC",
  kW: "KiloW",
  "%": "PERCENT",
  Hz: "HZ",
  s: "SEC",
};

/** The Brick class of a piece of equipment; a pump by the loop it moves when that is known. */
export function brickEquipmentClass(e: Pick<ModelEquipment, "kind" | "name" | "record">): string {
  switch (e.kind) {
    case "chiller":
      return "Chiller";
    case "cooling_tower":
      return "Cooling_Tower";
    case "pump": {
      const loop = pumpLoop(e);
      return loop === "chilled_water"
        ? "Chilled_Water_Pump"
        : loop === "condenser_water"
          ? "Condenser_Water_Pump"
          : "Pump";
    }
    case "air_handler":
      return "Air_Handling_Unit";
    case "weather_station":
      return "Weather_Station";
  }
}

const { namedNode, literal, quad } = DataFactory;

/** The quads of a site's model (the Turtle is written from these). */
export function brickQuads(model: SiteModel): Quad[] {
  const ns = siteNamespace(model.site.id);
  // Escaped so no two names meet: "." only ever separates the parts below.
  const part = (name: string) =>
    encodeURIComponent(name).replace(/[.!~*'()]/g, (c) => `%${c.charCodeAt(0).toString(16).toUpperCase()}`);
  const local = (name: string) => namedNode(ns + name);
  const brick = (name: string) => namedNode(BRICK + name);
  const type = namedNode(`${RDF}type`);
  const label = namedNode(`${RDFS}label`);
  const quads: Quad[] = [];
  const site = local("site");
  quads.push(quad(site, type, brick("Site")), quad(site, label, literal(model.site.name)));
  const equipNode = new Map<string, ReturnType<typeof local>>();
  for (const e of model.equipment) {
    const node = local(`equip.${part(e.tag)}`);
    equipNode.set(e.id, node);
    quads.push(
      quad(node, type, brick(brickEquipmentClass(e))),
      quad(node, label, literal(e.name)),
      quad(node, brick("hasLocation"), site),
      quad(site, brick("isLocationOf"), node),
    );
  }
  const tagOf = new Map(model.equipment.map((e) => [e.id, e.tag]));
  for (const p of model.points) {
    const equip = equipNode.get(p.equipmentId);
    if (!equip) continue;
    const node = local(`point.${part(tagOf.get(p.equipmentId)!)}.${part(p.key)}`);
    quads.push(
      quad(node, type, brick(p.brickClass)),
      quad(node, label, literal(`${tagOf.get(p.equipmentId)} ${p.key}`)),
      quad(node, brick("isPointOf"), equip),
      quad(equip, brick("hasPoint"), node),
    );
    const unit = qudtUnits[p.unit];
    if (unit) quads.push(quad(node, brick("hasUnit"), namedNode(QUDT_UNIT + unit)));
  }
  for (const f of plantFeeds(model.equipment)) {
    quads.push(quad(equipNode.get(f.from.id)!, brick("feeds"), equipNode.get(f.to.id)!));
  }
  return quads;
}

/** The site's model as Turtle, with brick, rdfs, unit and the site's own prefix. */
export function brickTurtle(model: SiteModel): Promise<string> {
  const writer = new Writer({
    prefixes: { brick: BRICK, rdfs: RDFS, unit: QUDT_UNIT, site: siteNamespace(model.site.id) },
  });
  writer.addQuads(brickQuads(model));
  return new Promise((resolve, reject) =>
    writer.end((error, result: string) => (error ? reject(error) : resolve(result))),
  );
}
